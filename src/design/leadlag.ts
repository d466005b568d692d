import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import { gainFromTargets } from './gain-step.js';
import { lagFor } from './lag.js';
import { leadsAt } from './lead-fc.js';
import { gridBetween, refineParameter, worstPmOver } from './refine.js';
import { magnitudeCrossingsRadS, phaseCrossingsRadS, scaledShape, shapePhaseDeg, withBlocks } from './shape.js';
import type { ErrorConstantTarget } from './targets.js';
import { failedOutcome, type Candidate, type DesignOutcome, type DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/** Settings of the lead-lag design. */
export interface LeadLagSettings {
  readonly pmDeg: number;
  /** Crossover (chosen, or from the loop's fc requirement); null takes the phase crossover of K·P (where its phase is -180 deg). */
  readonly fcRadS: number | null;
  /** Allowance for the lag's own phase at the crossover (deg). */
  readonly allowDeg: number;
  readonly maxStagePhaseDeg: number;
  readonly stages: number | null;
  /** The lag zero sits this many times below the crossover. */
  readonly zeroRatio: number;
  readonly targets: readonly ErrorConstantTarget[];
  readonly fallbackK: number;
}

/**
 * Lead-lag: the lag supplies the low-frequency gain the error constant asks for,
 * the lead the phase at the crossover. Gain K from the error constant; the crossover
 * is the given one (--fc or the loop's fc requirement) or, as in the classic lag-lead
 * procedure, the frequency where the phase of K·P is -180 deg; leads centred there add target - present + allowance;
 * the lag (zero a decade below) removes the magnitude left over at the crossover, or,
 * when the loop is short of gain there, the gain is raised instead. The lead's phase
 * is then refined numerically until the worst variant's margin equals the target.
 */
export function designLeadLag(variants: readonly DesignVariant[], designIndex: number, s: LeadLagSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  ws.section(`hand procedure (lead-lag, on variant ${v.name})`);
  const g = gainFromTargets(v, s.targets, s.fallbackK, ws);
  if (!g.ok) return failedOutcome(ws.steps, g.reason);
  const k = g.k;
  const kf = scaledShape(v, k);
  let wc = s.fcRadS;
  if (wc === null) {
    wc = phaseCrossingsRadS(kf, -180)[0] ?? null;
    if (wc !== null) ws.add('crossover: where the phase of K·P is -180 deg', wc, 'rad/s');
    else {
      const cross = magnitudeCrossingsRadS(kf, 1);
      if (cross.length === 0) return failedOutcome(ws.steps, 'K·P has neither a phase crossover nor a gain crossover: give the crossover with --fc');
      wc = cross[cross.length - 1]!;
      ws.add('crossover: that of K·P (its phase never reaches -180 deg)', wc, 'rad/s');
    }
  } else ws.add('crossover (chosen, or from the fc requirement)', wc, 'rad/s');
  const w = wc;
  const pm0 = 180 + shapePhaseDeg(kf, w);
  ws.add('phase of K·P at the crossover + 180', pm0, 'deg');
  ws.add('target phase margin', s.pmDeg, 'deg');
  ws.add("allowance for the lag's phase", s.allowDeg, 'deg');
  const phi = s.pmDeg - pm0 + s.allowDeg;
  ws.add('phase to add', phi, 'deg');
  const n = phi <= 0 ? 0 : (s.stages ?? Math.max(1, Math.ceil(phi / s.maxStagePhaseDeg - 1e-9)));
  ws.add('lead stages', n);
  if (n > 0 && phi / n >= 89) return failedOutcome(ws.steps, `each of ${n} stage(s) would have to add ${formatNumber(phi / n)} deg: use more stages or another crossover`);

  const build = (p: number): { blocks: Block[]; alpha: number; beta: number | null; gain: number } => {
    const l = leadsAt(kf, w, p, n);
    // l.gain > 1: the loop is short of gain at w, so raise it (the error constant only grows);
    // l.gain < 1: keep K and let a lag take away 1/l.gain at w.
    if (l.gain >= 1) return { blocks: [{ kind: 'gain', k: k * l.gain }, ...l.leads], alpha: l.alpha, beta: null, gain: k * l.gain };
    const withLeads = withBlocks(v, [{ kind: 'gain', k }, ...l.leads]).shape;
    const lag = lagFor(withLeads, w, s.zeroRatio);
    const blocks: Block[] = [{ kind: 'gain', k }, ...l.leads];
    if (lag !== null) blocks.push(lag.block);
    return { blocks, alpha: l.alpha, beta: lag?.beta ?? null, gain: k };
  };
  const h = build(phi);
  if (n > 0) ws.add('alpha', h.alpha);
  ws.add('gain', h.gain);
  if (h.beta !== null) {
    ws.add('magnitude left at the crossover = beta', h.beta);
    const lag = h.blocks[h.blocks.length - 1]!;
    if (lag.kind === 'lag') {
      ws.add('lag zero', lag.zeroRadS, 'rad/s');
      ws.add('lag pole = zero / beta', lag.poleRadS, 'rad/s');
    }
  } else ws.add('no lag: the gain was raised to reach |L| = 1 at the crossover', null);
  const hand: Candidate = { blocks: h.blocks, worstPmDeg: worstPmOver(variants, h.blocks) };
  ws.add('phase margin of the hand design (worst variant)', hand.worstPmDeg, 'deg');
  if (n === 0) {
    const ok = hand.worstPmDeg >= s.pmDeg;
    return { blocks: h.blocks, hand, refined: hand, worksheet: ws.steps, feasible: ok, message: ok ? 'no lead needed at this crossover: gain and lag only' : `the margin is ${formatNumber(hand.worstPmDeg, 3)} deg, below the target: choose another crossover (--fc)` };
  }
  ws.section('refinement (lead phase adjusted, crossover kept)');
  const r = refineParameter((p) => worstPmOver(variants, build(p).blocks), gridBetween(0.25, Math.min(n * s.maxStagePhaseDeg, n * 85), 48), s.pmDeg, 'first');
  const fin = build(r.x);
  const refined: Candidate = { blocks: fin.blocks, worstPmDeg: r.pmDeg };
  ws.add('phase added', r.x, 'deg');
  ws.add('alpha', fin.alpha);
  ws.add('phase margin (worst variant)', r.pmDeg, 'deg');
  if (!r.reached) {
    return { blocks: fin.blocks, hand, refined, worksheet: ws.steps, feasible: false, message: `a phase margin of ${formatNumber(s.pmDeg)} deg cannot be reached at this crossover with ${n} lead stage(s); the best is ${formatNumber(r.pmDeg, 3)} deg: choose a lower crossover (--fc) or more stages` };
  }
  return { blocks: fin.blocks, hand, refined, worksheet: ws.steps, feasible: true, message: `lead-lag with ${n} lead stage(s), refined to the target phase margin` };
}
