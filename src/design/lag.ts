import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import type { Factored } from '../analysis/factors.js';
import { gainFromTargets } from './gain-step.js';
import { gridBetween, refineParameter, worstPmOver } from './refine.js';
import { magnitudeCrossingsRadS, phaseCrossingsRadS, scaledShape, shapeMagnitude, shapePhaseDeg } from './shape.js';
import type { ErrorConstantTarget } from './targets.js';
import { failedOutcome, type Candidate, type DesignOutcome, type DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/** Settings of the lag procedure. */
export interface LagSettings {
  readonly pmDeg: number;
  /** Allowance for the lag's own phase at the new crossover (deg); usually 5-12. */
  readonly allowDeg: number;
  /** The lag zero sits this many times below the new crossover (10: a decade). */
  readonly zeroRatio: number;
  readonly targets: readonly ErrorConstantTarget[];
  readonly fallbackK: number;
}

/**
 * The lag that makes wRadS the new crossover of the loop K·F: zero at w/ratio, pole
 * lower by beta = |K F(jw)|, so the lag's high-frequency gain 1/beta brings |L(jw)|
 * to 1. Null when |K F(jw)| <= 1 (no attenuation is needed there).
 */
export function lagFor(kf: Factored, wRadS: number, zeroRatio: number): { block: Block; beta: number } | null {
  const beta = shapeMagnitude(kf, wRadS);
  if (!(beta > 1)) return null;
  const zero = wRadS / zeroRatio;
  return { block: { kind: 'lag', zeroRadS: zero, poleRadS: zero / beta }, beta };
}

/**
 * Phase lag by the published frequency-response procedure: gain from the error
 * constant; the new crossover where the phase of K·F is -180 + target + allowance;
 * zero a decade (zeroRatio) below it; pole from the gain ratio beta = |K F| there.
 * Then the crossover is refined numerically (gain untouched) until the worst
 * variant's margin equals the target, taking the highest crossover that does.
 */
export function designLag(variants: readonly DesignVariant[], designIndex: number, s: LagSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  ws.section(`hand procedure (lag, on variant ${v.name})`);
  const g = gainFromTargets(v, s.targets, s.fallbackK, ws);
  if (!g.ok) return failedOutcome(ws.steps, g.reason);
  const k = g.k;
  const kf = scaledShape(v, k);
  const gainOnly: Block[] = [{ kind: 'gain', k }];
  const pmGain = worstPmOver(variants, gainOnly);
  ws.add('phase margin with the gain alone (worst variant)', pmGain, 'deg');
  ws.add('target phase margin', s.pmDeg, 'deg');
  ws.add("allowance for the lag's own phase", s.allowDeg, 'deg');
  const level = -180 + s.pmDeg + s.allowDeg;
  ws.add('phase wanted at the new crossover', level, 'deg');
  const w1s = phaseCrossingsRadS(kf, level);
  if (w1s.length === 0) {
    if (pmGain >= s.pmDeg) return gainOnlyOutcome(ws, gainOnly, pmGain);
    return failedOutcome(ws.steps, `the phase of K·P never reaches ${formatNumber(level)} deg: a lag cannot help here; try lead or leadlag`);
  }
  const w1 = w1s[0]!;
  ws.add('new crossover', w1, 'rad/s');
  const lag = lagFor(kf, w1, s.zeroRatio);
  if (lag === null) {
    if (pmGain >= s.pmDeg) return gainOnlyOutcome(ws, gainOnly, pmGain);
    return failedOutcome(ws.steps, '|K·P| is already below 1 at the new crossover, yet the margin misses the target: a lag cannot help; try lead');
  }
  ws.add('|K·P| there = beta', lag.beta);
  ws.add('attenuation needed 20 log10(beta)', 20 * Math.log10(lag.beta), 'dB');
  ws.add('zero ratio (zero below the crossover)', s.zeroRatio);
  ws.add('lag zero', lagZero(lag.block), 'rad/s');
  ws.add('lag pole = zero / beta', lagPole(lag.block), 'rad/s');
  const handBlocks = [...gainOnly, lag.block];
  const hand: Candidate = { blocks: handBlocks, worstPmDeg: worstPmOver(variants, handBlocks) };
  ws.add('phase margin of the hand design (worst variant)', hand.worstPmDeg, 'deg');

  ws.section('refinement (new crossover adjusted, gain kept)');
  // Without any allowance the crossover could go no higher than where the phase is -180 + target.
  const top = phaseCrossingsRadS(kf, -180 + s.pmDeg)[0] ?? w1 * 3;
  const build = (w: number): Block[] => {
    const l = lagFor(kf, w, s.zeroRatio);
    return l === null ? gainOnly : [...gainOnly, l.block];
  };
  const r = refineParameter((w) => worstPmOver(variants, build(w)), gridBetween(w1 / 30, top * 1.02, 60, true), s.pmDeg, 'last');
  const blocks = build(r.x);
  const refined: Candidate = { blocks, worstPmDeg: r.pmDeg };
  ws.add('new crossover', r.x, 'rad/s');
  ws.add('phase of K·P there', shapePhaseDeg(kf, r.x), 'deg');
  ws.add('allowance that was needed', shapePhaseDeg(kf, r.x) + 180 - s.pmDeg, 'deg');
  const lagBlock = blocks[1];
  if (lagBlock) {
    ws.add('lag zero', lagZero(lagBlock), 'rad/s');
    ws.add('lag pole', lagPole(lagBlock), 'rad/s');
  }
  ws.add('phase margin (worst variant)', r.pmDeg, 'deg');
  if (!r.reached) {
    return { blocks, hand, refined, worksheet: ws.steps, feasible: false, message: `a phase margin of ${formatNumber(s.pmDeg)} deg cannot be reached with a lag at this gain; the best is ${formatNumber(r.pmDeg, 3)} deg: try leadlag` };
  }
  const crossings = magnitudeCrossingsRadS(kf, 1);
  const note = crossings.length > 0 ? `; crossover moved from ${formatNumber(crossings[crossings.length - 1]!)} to ${formatNumber(r.x)} rad/s` : '';
  return { blocks, hand, refined, worksheet: ws.steps, feasible: true, message: `lag refined to the target phase margin${note}` };
}

function lagZero(b: Block): number {
  return b.kind === 'lag' ? b.zeroRadS : NaN;
}

function lagPole(b: Block): number {
  return b.kind === 'lag' ? b.poleRadS : NaN;
}

function gainOnlyOutcome(ws: Worksheet, blocks: Block[], pm: number): DesignOutcome {
  const c: Candidate = { blocks, worstPmDeg: pm };
  return { blocks, hand: c, refined: c, worksheet: ws.steps, feasible: true, message: 'the gain alone gives the target phase margin: no lag needed' };
}
