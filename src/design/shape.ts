import type { Block } from '../model/blocks.js';
import type { TransferFunction } from '../model/tf.js';
import { factorTf, factoredAt, type Factored } from '../analysis/factors.js';
import { frequencyRangeRadS, loopGridRadS } from '../analysis/freq.js';
import { brentRoot } from '../analysis/scalar.js';
import { blockTf } from './blocks-tf.js';

/**
 * Loop shapes for design: a loop held in factored form (gain, zeros, poles, delay),
 * so that trying one more candidate compensator only appends the candidate's few
 * roots instead of finding the roots of the whole loop again. Phase is continuous
 * (sum of factor angles), which is what the Bode procedures read off.
 */

const RAD = 180 / Math.PI;

/** The series connection of factored forms: gains multiply, roots and delays add up. */
export function shapeSeries(parts: readonly Factored[]): Factored {
  let gain = 1;
  let delayS = 0;
  const zeros = [];
  const poles = [];
  for (const p of parts) {
    gain *= p.gain;
    delayS += p.delayS;
    zeros.push(...p.zeros);
    poles.push(...p.poles);
  }
  return { gain, zeros, poles, delayS };
}

/** One compensator block in factored form. */
export function blockShape(b: Block): Factored {
  return factorTf(blockTf(b));
}

/** plant (already factored) followed by blocks in series. */
export function shapeWithBlocks(plant: Factored, blocks: readonly Block[]): Factored {
  return shapeSeries([plant, ...blocks.map(blockShape)]);
}

/** Factored form of a transfer function (roots found once). */
export function shapeOf(tf: TransferFunction): Factored {
  return factorTf(tf);
}

/** Multiplies a shape by a constant gain. */
export function shapeScaled(f: Factored, k: number): Factored {
  return { ...f, gain: f.gain * k };
}

/** |G(jw)| */
export function shapeMagnitude(f: Factored, wRadS: number): number {
  return Math.exp(factoredAt(f, wRadS, new Float64Array(4))[0]!);
}

/** Continuous phase of G(jw) in degrees (delay included; never wrapped). */
export function shapePhaseDeg(f: Factored, wRadS: number): number {
  return factoredAt(f, wRadS, new Float64Array(4))[1]! * RAD;
}

/** A search range and grid for a shape, widened to include the given frequencies. */
export function shapeGridRadS(f: Factored, extraRadS: readonly number[] = []): Float64Array {
  const [lo, hi] = frequencyRangeRadS(f, extraRadS);
  // Two decades more on each side than a plot needs: crossings of a steep
  // high-order loop can sit far from every corner.
  return loopGridRadS(f, lo / 100, hi * 100, 24);
}

/**
 * Every frequency on the grid's span where g(w) changes sign, refined by Brent's
 * method on log-frequency. g must be continuous between grid points.
 */
export function signChangesRadS(g: (wRadS: number) => number, grid: ArrayLike<number>): number[] {
  const out: number[] = [];
  let wPrev = grid[0]!;
  let gPrev = g(wPrev);
  for (let i = 1; i < grid.length; i++) {
    const w = grid[i]!;
    const gw = g(w);
    if (gPrev === 0) out.push(wPrev);
    else if (gPrev * gw < 0) {
      const x = brentRoot((lw) => g(Math.exp(lw)), Math.log(wPrev), Math.log(w), 1e-14);
      out.push(Math.exp(x));
    }
    wPrev = w;
    gPrev = gw;
  }
  if (gPrev === 0) out.push(wPrev);
  return out;
}

/** Frequencies where |G(jw)| equals `level` (e.g. 1 for gain crossovers), ascending. */
export function magnitudeCrossingsRadS(f: Factored, level: number, extraRadS: readonly number[] = []): number[] {
  const buf = new Float64Array(4);
  const lnLevel = Math.log(level);
  return signChangesRadS((w) => factoredAt(f, w, buf)[0]! - lnLevel, shapeGridRadS(f, extraRadS));
}

/** Frequencies where the continuous phase of G(jw) equals `phaseDeg`, ascending. */
export function phaseCrossingsRadS(f: Factored, phaseDeg: number, extraRadS: readonly number[] = []): number[] {
  const buf = new Float64Array(4);
  const target = phaseDeg / RAD;
  return signChangesRadS((w) => factoredAt(f, w, buf)[1]! - target, shapeGridRadS(f, extraRadS));
}
