import type { Poly, TransferFunction } from '../model/tf.js';
import { polyDegree, polyEvalJw, polyMul, polyTrim } from './poly.js';

/** Small helpers on rational transfer functions with an optional pure delay. */

/** Builds a transfer function, trimming both polynomials; delay defaults to 0. */
export function tfMake(num: Poly, den: Poly, delayS = 0): TransferFunction {
  return { num: polyTrim(num), den: polyTrim(den), delayS };
}

/** G(jw) as [re, im], including the pure delay. */
export function tfEvalJw(tf: TransferFunction, wRadS: number): [number, number] {
  const [nr, ni] = polyEvalJw(tf.num, wRadS);
  const [dr, di] = polyEvalJw(tf.den, wRadS);
  const d2 = dr * dr + di * di;
  let re = (nr * dr + ni * di) / d2;
  let im = (ni * dr - nr * di) / d2;
  if (tf.delayS > 0) {
    const c = Math.cos(wRadS * tf.delayS);
    const s = -Math.sin(wRadS * tf.delayS);
    const r2 = re * c - im * s;
    im = re * s + im * c;
    re = r2;
  }
  return [re, im];
}

/** a·b in series: numerators and denominators multiplied (nothing cancelled), delays added. */
export function tfSeries(a: TransferFunction, b: TransferFunction): TransferFunction {
  return tfMake(polyMul(a.num, b.num), polyMul(a.den, b.den), a.delayS + b.delayS);
}

/** deg(den) - deg(num); -Infinity-safe: a zero numerator counts as relative degree Infinity. */
export function tfRelativeDegree(tf: TransferFunction): number {
  return polyDegree(tf.den) - polyDegree(tf.num);
}

/** True when deg(num) <= deg(den). */
export function tfIsProper(tf: TransferFunction): boolean {
  return tfRelativeDegree(tf) >= 0;
}

/** Value at infinity of a proper rational function (delay ignored): ratio of leading coefficients, or 0 when strictly proper. */
export function tfValueAtInfinity(tf: TransferFunction): number {
  const n = polyTrim(tf.num);
  const d = polyTrim(tf.den);
  if (n.length < d.length) return 0;
  if (n.length > d.length) return Infinity;
  return n[n.length - 1]! / d[d.length - 1]!;
}
