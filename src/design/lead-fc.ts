import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import type { Factored } from '../analysis/factors.js';
import { tfSeries } from '../analysis/tf.js';
import { compensatorTf } from './blocks-tf.js';
import { leadAlphaForPhase, leadStages } from './lead-math.js';
import { AIM_ABOVE_DEG, gridBetween, refineParameter, worstPmOver } from './refine.js';
import { shapeMagnitude, shapePhaseDeg } from './shape.js';
import { ERROR_CONSTANT_UNIT, errorConstantOf, type ErrorConstantTarget } from './targets.js';
import { failedOutcome, type Candidate, type DesignOutcome, type DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/** Settings of the lead at a chosen crossover. */
export interface LeadAtSettings {
  readonly pmDeg: number;
  readonly fcRadS: number;
  readonly maxStagePhaseDeg: number;
  readonly stages: number | null;
  /** Checked, not designed for: the gain is set by the crossover. */
  readonly targets: readonly ErrorConstantTarget[];
}

/** n leads adding phiTotalDeg, centred at wRadS, and the gain that puts |L(jw)| = 1 there. */
export function leadsAt(f: Factored, wRadS: number, phiTotalDeg: number, n: number): { gain: number; leads: Block[]; alpha: number } {
  const alpha = n === 0 ? 1 : leadAlphaForPhase(phiTotalDeg / n);
  const gain = alpha ** (n / 2) / shapeMagnitude(f, wRadS);
  return { gain, leads: n === 0 ? [] : leadStages(wRadS, alpha, n), alpha };
}

/**
 * Lead at a chosen crossover (common in motion control): the phase the plant lacks at
 * fc, split over equal stages centred at fc, and the gain that makes |L(j fc)| = 1.
 * The margin at fc is then the target by construction; when other variants fall
 * short, the added phase is raised numerically until the worst one meets it.
 */
export function designLeadAtCrossover(variants: readonly DesignVariant[], designIndex: number, s: LeadAtSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  const fc = s.fcRadS;
  ws.section(`lead at a chosen crossover (on variant ${v.name})`);
  ws.add('chosen crossover fc', fc, 'rad/s');
  const pm0 = 180 + shapePhaseDeg(v.shape, fc);
  ws.add('plant phase at fc + 180', pm0, 'deg');
  ws.add('target phase margin', s.pmDeg, 'deg');
  const phi = s.pmDeg + AIM_ABOVE_DEG - pm0;
  ws.add('phase to add (no allowance: the crossover is fixed)', phi, 'deg');
  const n = phi <= 0 ? 0 : (s.stages ?? Math.max(1, Math.ceil(phi / s.maxStagePhaseDeg - 1e-9)));
  if (n > 0 && phi / n >= 89) return failedOutcome(ws.steps, `each of ${n} stage(s) would have to add ${formatNumber(phi / n)} deg; a lead gives less than 90 deg: use more stages or a lower fc`);
  const build = (p: number): Block[] => {
    const l = leadsAt(v.shape, fc, p, n);
    return [{ kind: 'gain', k: l.gain }, ...l.leads];
  };
  const hand = leadsAt(v.shape, fc, phi, n);
  ws.add('stages', n);
  if (n > 0) {
    ws.add('alpha = (1 - sin phi_m)/(1 + sin phi_m)', hand.alpha);
    ws.add('lead zero fc sqrt(alpha)', fc * Math.sqrt(hand.alpha), 'rad/s');
    ws.add('lead pole fc / sqrt(alpha)', fc / Math.sqrt(hand.alpha), 'rad/s');
  }
  ws.add('|P(j fc)|', shapeMagnitude(v.shape, fc));
  ws.add('gain K = alpha^(n/2) / |P(j fc)|', hand.gain);
  const handBlocks = build(phi);
  const handCand: Candidate = { blocks: handBlocks, worstPmDeg: worstPmOver(variants, handBlocks) };
  ws.add('phase margin (worst variant)', handCand.worstPmDeg, 'deg');
  let refined = handCand;
  let reached = handCand.worstPmDeg >= s.pmDeg;
  if (!reached && n > 0) {
    ws.section('refinement (more phase for the worst variant, crossover kept at fc)');
    const r = refineParameter((p) => worstPmOver(variants, build(p)), gridBetween(phi, Math.min(n * s.maxStagePhaseDeg, n * 85), 40), s.pmDeg, 'first');
    refined = { blocks: build(r.x), worstPmDeg: r.pmDeg };
    reached = r.reached;
    ws.add('phase added', r.x, 'deg');
    ws.add('phase margin (worst variant)', r.pmDeg, 'deg');
  }
  const misses = constantShortfalls(v, refined.blocks, s.targets, ws);
  if (!reached) {
    return { blocks: refined.blocks, hand: handCand, refined, worksheet: ws.steps, feasible: false, message: `a phase margin of ${formatNumber(s.pmDeg)} deg at ${formatNumber(fc)} rad/s is out of reach for every variant; the best is ${formatNumber(refined.worstPmDeg, 3)} deg: lower fc or add stages` };
  }
  const msg = misses.length > 0 ? `lead at fc; ${misses.join(', ')}: use leadlag to add low-frequency gain` : n === 0 ? 'the plant already has the phase at fc: gain only' : `lead with ${n} stage(s) at the chosen crossover`;
  return { blocks: refined.blocks, hand: handCand, refined, worksheet: ws.steps, feasible: misses.length === 0, message: msg };
}

/** Error constants the design reaches, written to the worksheet; the ones it misses as phrases. */
export function constantShortfalls(v: DesignVariant, blocks: readonly Block[], targets: readonly ErrorConstantTarget[], ws: Worksheet): string[] {
  const loop = tfSeries(compensatorTf({ blocks }), v.tf);
  const out: string[] = [];
  for (const t of targets) {
    const got = errorConstantOf(loop, t.kind);
    ws.add(`${t.kind} reached (required ${formatNumber(t.value)})`, got, ERROR_CONSTANT_UNIT[t.kind]);
    if (!(got >= t.value)) out.push(`${t.kind} ${formatNumber(got)} < ${formatNumber(t.value)}`);
  }
  return out;
}
