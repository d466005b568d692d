import type { Poly } from '../model/tf.js';

/**
 * The (n, n) Pade approximant of exp(-delayS s): num(s)/den(s) with
 *   den(s) = sum_k c_k (T s)^k,  num(s) = sum_k c_k (-T s)^k,
 *   c_k = (2n - k)! n! / ((2n)! k! (n - k)!).
 * Ascending coefficients; den(0) = num(0) = 1.
 */
export function padeDelay(delayS: number, order: number): { num: Poly; den: Poly } {
  const num: number[] = [];
  const den: number[] = [];
  let c = 1; // c_0
  let tk = 1; // T^k
  for (let k = 0; k <= order; k++) {
    den.push(c * tk);
    num.push((k % 2 === 0 ? 1 : -1) * c * tk);
    // c_{k+1} / c_k = (n - k) / ((2n - k) (k + 1))
    c *= (order - k) / ((2 * order - k) * (k + 1));
    tk *= delayS;
  }
  return { num, den };
}
