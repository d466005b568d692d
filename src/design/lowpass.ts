import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import { compensatorHfGain } from './blocks-tf.js';
import { gridBetween, refineParameter, worstPmOver } from './refine.js';
import { magnitudeCrossingsRadS } from './shape.js';
import type { DesignOutcome, DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/** Settings of the low-pass proposal. */
export interface LowpassSettings {
  /** Phase margin that must remain (deg). */
  readonly pmDeg: number;
  /** 1: first order; 2: second order with damping 0.7. */
  readonly order: 1 | 2;
  /** The existing compensator's blocks (for the noise-gain report). */
  readonly existing: readonly Block[];
}

/** The corner is kept at least this many times above the crossover (common practice: a filter well above crossover). */
const MIN_CORNER_RATIO = 3;
const MAX_CORNER_RATIO = 1000;
const ZETA = 0.7;

function lowpassAt(wRadS: number, order: 1 | 2): Block {
  return order === 1 ? { kind: 'lowpass1', cornerRadS: wRadS } : { kind: 'lowpass2', cornerRadS: wRadS, zeta: ZETA };
}

/**
 * Low-pass for noise above the crossover: spends the phase margin the loop has beyond
 * the target on the lowest corner frequency that still leaves the target on every
 * variant, never closer than 3x the crossover. Existing blocks are kept.
 */
export function designLowpass(variants: readonly DesignVariant[], designIndex: number, s: LowpassSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  ws.section(`low-pass above the crossover (order ${s.order})`);
  const cross = magnitudeCrossingsRadS(v.shape, 1);
  if (cross.length === 0) return { blocks: [], hand: null, refined: null, worksheet: ws.steps, feasible: false, message: 'the loop has no gain crossover: there is no crossover to stay above' };
  const wc = cross[cross.length - 1]!;
  const pmNow = worstPmOver(variants, []);
  ws.add(`present crossover (variant ${v.name})`, wc, 'rad/s');
  ws.add('present phase margin (worst variant)', pmNow, 'deg');
  ws.add('phase margin to keep', s.pmDeg, 'deg');
  ws.add('phase that may be spent', pmNow - s.pmDeg, 'deg');
  if (!(pmNow > s.pmDeg)) {
    return { blocks: [], hand: null, refined: null, worksheet: ws.steps, feasible: false, message: `the phase margin (${formatNumber(pmNow, 3)} deg) has nothing to spare above ${formatNumber(s.pmDeg)} deg: improve the margin first (lead), then filter` };
  }
  const r = refineParameter((w) => worstPmOver(variants, [lowpassAt(w, s.order)]), gridBetween(MIN_CORNER_RATIO * wc, MAX_CORNER_RATIO * wc, 60, true), s.pmDeg, 'first');
  if (!r.reached) {
    return { blocks: [], hand: null, refined: null, worksheet: ws.steps, feasible: false, message: `even a corner at ${MAX_CORNER_RATIO}x the crossover takes the margin below ${formatNumber(s.pmDeg)} deg` };
  }
  const block = lowpassAt(r.x, s.order);
  ws.add('corner frequency', r.x, 'rad/s');
  ws.add('corner / crossover', r.x / wc);
  if (r.x <= MIN_CORNER_RATIO * wc * (1 + 1e-9)) ws.add('corner held at the 3x-crossover floor', null);
  ws.add('phase margin with the filter (worst variant)', r.pmDeg, 'deg');
  const hfBefore = compensatorHfGain({ blocks: s.existing });
  const hfAfter = compensatorHfGain({ blocks: [...s.existing, block] });
  ws.add('compensator gain at high frequency before', hfBefore);
  ws.add('compensator gain at high frequency after', hfAfter);
  const cand = { blocks: [block], worstPmDeg: r.pmDeg };
  return { blocks: [block], hand: null, refined: cand, worksheet: ws.steps, feasible: true, message: `low-pass at ${formatNumber(r.x / wc, 3)}x the crossover, phase margin ${formatNumber(r.pmDeg, 3)} deg` };
}
