import type { Block } from '../model/blocks.js';
import type { Complex, TransferFunction } from '../model/tf.js';
import { factorTf, factoredAt, type Factored } from '../analysis/factors.js';
import { frequencyRangeRadS, loopGridRadS } from '../analysis/freq.js';
import { brentRoot } from '../analysis/scalar.js';
import { tfSeries } from '../analysis/tf.js';
import { blockTf, compensatorTf } from './blocks-tf.js';

/**
 * Loop shapes for design: a loop held in factored form (gain, zeros, poles, delay)
 * beside its polynomials, so that trying one more candidate compensator only adds
 * the candidate's few roots instead of finding the roots of the whole loop again.
 * Phase is continuous (sum of factor angles), which is what the Bode procedures read off.
 */

const RAD = 180 / Math.PI;

/** A loop (or plant) in both forms: polynomials for exact values, factors for the continuous phase. */
export interface LoopForms {
  readonly tf: TransferFunction;
  readonly shape: Factored;
}

/** Roots of a block, found once per block. */
function blockRoots(b: Block): Factored {
  return factorTf(blockTf(b));
}

/** Factored form of a transfer function whose roots are already known (or found here when not given). */
export function shapeOf(tf: TransferFunction, zeros?: readonly Complex[], poles?: readonly Complex[]): Factored {
  return factorTf(tf, zeros, poles);
}

/** The loop in series with blocks: its polynomials multiplied, its known roots reused. */
export function withBlocks(l: LoopForms, blocks: readonly Block[]): LoopForms {
  if (blocks.length === 0) return l;
  const tf = tfSeries(compensatorTf({ blocks }), l.tf);
  const parts = blocks.map(blockRoots);
  const zeros = [...l.shape.zeros, ...parts.flatMap((p) => p.zeros)];
  const poles = [...l.shape.poles, ...parts.flatMap((p) => p.poles)];
  return { tf, shape: factorTf(tf, zeros, poles) };
}

/** The shape of k times the loop. */
export function scaledShape(l: LoopForms, k: number): Factored {
  return withBlocks(l, [{ kind: 'gain', k }]).shape;
}

/** |G(jw)| */
export function shapeMagnitude(f: Factored, wRadS: number): number {
  return Math.exp(factoredAt(f, wRadS, new Float64Array(4))[0]!);
}

/** Continuous phase of G(jw) in degrees (delay included; never wrapped). */
export function shapePhaseDeg(f: Factored, wRadS: number): number {
  return factoredAt(f, wRadS, new Float64Array(4))[1]! * RAD - bodeOffsetDeg(f);
}

/**
 * The multiple of 360 deg that makes the continuous phase read as a Bode plot does:
 * -90 deg per net integrator at low frequency (a right-half-plane root starts its
 * factor angle at 180 deg, which would otherwise shift the whole curve by 360).
 */
export function bodeOffsetDeg(f: Factored): number {
  const mags = [...f.zeros, ...f.poles].map((r) => Math.hypot(r.re, r.im)).filter((m) => m > 0 && Number.isFinite(m));
  const wLow = (mags.length === 0 ? 1 : Math.min(...mags)) * 1e-6;
  const atOrigin = (rs: Factored['poles']) => rs.filter((r) => r.re === 0 && r.im === 0).length;
  const base = -90 * (atOrigin(f.poles) - atOrigin(f.zeros));
  const raw = factoredAt({ ...f, delayS: 0 }, wLow, new Float64Array(4))[1]! * RAD;
  return 360 * Math.round((raw - base) / 360);
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
  const target = (phaseDeg + bodeOffsetDeg(f)) / RAD;
  return signChangesRadS((w) => factoredAt(f, w, buf)[1]! - target, shapeGridRadS(f, extraRadS));
}
