import type { Poly } from '../model/tf.js';
import { polyMul, polyTrim } from './poly.js';

/**
 * Real polynomials in x = w^2 whose positive roots are the crossings of a loop
 * N/D on the jw axis. Both use P(s)·Q(-s): at s = jw its even powers give the
 * real part and its odd powers the imaginary part.
 */

/** q(-s) for ascending coefficients. */
function reflect(q: Poly): number[] {
  return q.map((c, k) => (k & 1 ? -c : c));
}

/** Coefficients (in x = w^2) of Re[p(jw) q(-jw)]. */
function realPartInW2(p: Poly, q: Poly): number[] {
  const c = polyMul(p, reflect(q));
  const out: number[] = [];
  for (let k = 0; k < c.length; k += 2) out.push((k & 2 ? -1 : 1) * c[k]!);
  return polyTrim(out);
}

/** |p(jw)|^2 as a polynomial in x = w^2. */
export function magSquaredInW2(p: Poly): number[] {
  return realPartInW2(p, p);
}

/** Im[n(jw) d(-jw)] / w as a polynomial in x = w^2; its positive roots are where the angle of n/d is 0 or 180 deg. */
export function imagCrossInW2(n: Poly, d: Poly): number[] {
  const c = polyMul(n, reflect(d));
  const out: number[] = [];
  for (let k = 1; k < c.length; k += 2) out.push((k & 2 ? -1 : 1) * c[k]!);
  return out.length === 0 ? [0] : polyTrim(out);
}
