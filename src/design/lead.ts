import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import { gainFromTargets } from './gain-step.js';
import { leadAlphaForPhase, leadStages } from './lead-math.js';
import { gridBetween, refineParameter, worstPmOver, type RefineResult } from './refine.js';
import { magnitudeCrossingsRadS, scaledShape, shapePhaseDeg } from './shape.js';
import type { ErrorConstantTarget } from './targets.js';
import { failedOutcome, type Candidate, type DesignOutcome, type DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/** Settings of the Bode lead procedure. */
export interface LeadSettings {
  readonly pmDeg: number;
  /** Safety allowance added to the phase to add (deg); the textbook 5 deg by default. */
  readonly allowDeg: number;
  /** Largest phase one stage may give (deg); more phase means more stages. */
  readonly maxStagePhaseDeg: number;
  /** Force this many stages; null chooses from the phase to add. */
  readonly stages: number | null;
  readonly targets: readonly ErrorConstantTarget[];
  /** Gain used when no error-constant target sets one. */
  readonly fallbackK: number;
}

/** Stages tried beyond the hand count before declaring the target out of reach. */
const EXTRA_STAGES = 3;
const MAX_STAGES = 6;

/**
 * The lead blocks for a total added phase split over n equal stages, centred where
 * the uncompensated magnitude is alpha^(n/2) (-n·10 log10(1/alpha) dB), so that the
 * stages' gain 1/sqrt(alpha) each lifts that point to the new crossover. Null when
 * the magnitude never falls that low.
 */
function leadBlocksFor(kf: DesignVariant['shape'], k: number, phiTotalDeg: number, n: number): { blocks: Block[]; alpha: number; wmRadS: number } | null {
  const alpha = leadAlphaForPhase(phiTotalDeg / n);
  const ws = magnitudeCrossingsRadS(kf, alpha ** (n / 2));
  if (ws.length === 0) return null;
  const wm = ws[ws.length - 1]!;
  return { blocks: [{ kind: 'gain', k }, ...leadStages(wm, alpha, n)], alpha, wmRadS: wm };
}

/**
 * Phase lead by the Bode procedure: gain from the error constant, phase margin at
 * that gain, phase to add = target - present + allowance, alpha from
 * sin(phi_m) = (1 - alpha)/(1 + alpha), the new crossover where the uncompensated
 * magnitude is -10 log10(1/alpha) dB, T = 1/(w_m sqrt(alpha)); several equal stages
 * when the phase exceeds the per-stage limit. Then the added phase is refined
 * numerically (gain untouched, so the error constant still holds) until the worst
 * variant's margin equals the target.
 */
export function designLeadBode(variants: readonly DesignVariant[], designIndex: number, s: LeadSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  ws.section(`hand procedure (Bode, on variant ${v.name})`);
  const g = gainFromTargets(v, s.targets, s.fallbackK, ws);
  if (!g.ok) return failedOutcome(ws.steps, g.reason);
  const k = g.k;
  const kf = scaledShape(v, k);
  const cross = magnitudeCrossingsRadS(kf, 1);
  if (cross.length === 0) return failedOutcome(ws.steps, `|K·P| never crosses 1 at K = ${formatNumber(k)}: there is no crossover to add phase at`);
  const wc0 = cross[cross.length - 1]!;
  const pm0 = 180 + shapePhaseDeg(kf, wc0);
  ws.add('uncompensated gain crossover', wc0, 'rad/s');
  ws.add('uncompensated phase margin', pm0, 'deg');
  ws.add('target phase margin', s.pmDeg, 'deg');
  ws.add('allowance for the crossover shift', s.allowDeg, 'deg');
  const gainOnly: Block[] = [{ kind: 'gain', k }];
  const pmGain = worstPmOver(variants, gainOnly);
  if (pmGain >= s.pmDeg) {
    const blocks = gainOnly;
    const c: Candidate = { blocks, worstPmDeg: pmGain };
    return { blocks, hand: c, refined: c, worksheet: ws.steps, feasible: true, message: 'the gain alone gives the target phase margin: no lead needed' };
  }
  const phi = s.pmDeg - pm0 + s.allowDeg;
  ws.add('phase to add', phi, 'deg');
  if (phi <= 0) {
    // This variant already has the margin; another one lacks it. The hand procedure has nothing
    // to add here, so go straight to the refinement, which works on the worst variant.
    ws.add('hand procedure on this variant: no phase to add (its margin already holds)', 0, 'deg');
    const handCand: Candidate = { blocks: gainOnly, worstPmDeg: pmGain };
    return refineAndFinish(variants, kf, k, s.stages ?? 1, s, ws, handCand, pm0, v);
  }
  const n = s.stages ?? Math.max(1, Math.ceil(phi / s.maxStagePhaseDeg - 1e-9));
  ws.add('stages', n);
  ws.add('phase per stage phi_m', phi / n, 'deg');
  if (phi / n >= 89) return failedOutcome(ws.steps, `each of ${n} stage(s) would have to add ${formatNumber(phi / n)} deg; a lead gives less than 90 deg: use more stages (--stages)`);
  const hand = leadBlocksFor(kf, k, phi, n);
  if (hand === null) return failedOutcome(ws.steps, 'the uncompensated magnitude never falls to the level the lead needs');
  ws.add('alpha = (1 - sin phi_m)/(1 + sin phi_m)', hand.alpha);
  ws.add('magnitude level -n·10 log10(1/alpha)', -n * 10 * Math.log10(1 / hand.alpha), 'dB');
  ws.add('new crossover w_m', hand.wmRadS, 'rad/s');
  ws.add('T = 1/(w_m sqrt(alpha))', 1 / (hand.wmRadS * Math.sqrt(hand.alpha)), 's');
  ws.add('lead zero 1/T', hand.wmRadS * Math.sqrt(hand.alpha), 'rad/s');
  ws.add('lead pole 1/(alpha T)', hand.wmRadS / Math.sqrt(hand.alpha), 'rad/s');
  ws.add('compensator gain K/alpha^n (textbook Kc)', k / hand.alpha ** n);
  const handCand: Candidate = { blocks: hand.blocks, worstPmDeg: worstPmOver(variants, hand.blocks) };
  ws.add('phase margin of the hand design (worst variant)', handCand.worstPmDeg, 'deg');

  return refineAndFinish(variants, kf, k, n, s, ws, handCand, pm0, v);
}

/** The numerical refinement after the hand procedure, and the outcome with both designs. */
function refineAndFinish(
  variants: readonly DesignVariant[], kf: DesignVariant['shape'], k: number, n: number, s: LeadSettings,
  ws: Worksheet, handCand: Candidate, pm0: number, v: DesignVariant,
): DesignOutcome {
  ws.section('refinement (added phase adjusted, gain kept)');
  const r = refineLead(variants, kf, k, n, s);
  const built = leadBlocksFor(kf, k, r.best.x, r.n)!;
  const refined: Candidate = { blocks: built.blocks, worstPmDeg: r.best.pmDeg };
  ws.add('stages', r.n);
  ws.add('phase added', r.best.x, 'deg');
  ws.add('allowance that was needed', r.best.x - (s.pmDeg - pm0), 'deg');
  ws.add('alpha', built.alpha);
  ws.add('new crossover w_m', built.wmRadS, 'rad/s');
  ws.add('lead zero', built.wmRadS * Math.sqrt(built.alpha), 'rad/s');
  ws.add('lead pole', built.wmRadS / Math.sqrt(built.alpha), 'rad/s');
  ws.add('phase margin (worst variant)', r.best.pmDeg, 'deg');
  if (!r.best.reached) {
    const why = v.shape.delayS > 0 ? ' (the delay takes the phase that more lead would add, as the crossover moves up)' : '';
    return {
      blocks: refined.blocks, hand: handCand, refined, worksheet: ws.steps, feasible: false,
      message: `a phase margin of ${formatNumber(s.pmDeg)} deg cannot be reached with up to ${r.tried} lead stage(s) at this gain${why}; the best achievable is ${formatNumber(r.best.pmDeg, 3)} deg`,
    };
  }
  const msg = r.best.exact ? `lead with ${r.n} stage(s); refined to the target phase margin` : `lead with ${r.n} stage(s); margin ${formatNumber(r.best.pmDeg, 3)} deg (at least the target)`;
  return { blocks: refined.blocks, hand: handCand, refined, worksheet: ws.steps, feasible: true, message: msg };
}

/** Refines the added phase; adds stages (unless forced) while the target stays out of reach. */
function refineLead(variants: readonly DesignVariant[], kf: DesignVariant['shape'], k: number, n0: number, s: LeadSettings): { n: number; tried: number; best: RefineResult } {
  let best: { n: number; tried: number; best: RefineResult } | null = null;
  const last = s.stages === null ? Math.min(MAX_STAGES, n0 + EXTRA_STAGES) : n0;
  for (let n = n0; n <= last; n++) {
    const top = Math.min(n * s.maxStagePhaseDeg, n * 85);
    const pmOf = (phi: number) => {
      const b = leadBlocksFor(kf, k, phi, n);
      return b === null ? -Infinity : worstPmOver(variants, b.blocks);
    };
    const r = refineParameter(pmOf, gridBetween(0.25, top, 48), s.pmDeg, 'first');
    if (best === null || r.pmDeg > best.best.pmDeg || (r.reached && !best.best.reached)) best = { n, tried: last, best: r };
    if (r.reached) return { n, tried: last, best: r };
  }
  return best!;
}
