import type { Poly, TransferFunction } from '../model/tf.js';

/**
 * System type and static error constants read exactly off the lowest-order
 * coefficients of L = N/D (the delay is 1 at s = 0 and does not matter).
 */
export interface ErrorConstants {
  /** Net number of integrators: zeros of D at s = 0 minus zeros of N at s = 0, floored at 0. */
  readonly systemType: number;
  /** lim L(s), s -> 0 (signed; +-Infinity above type 0). */
  readonly kp: number;
  /** lim s L(s). */
  readonly kv: number;
  /** lim s^2 L(s). */
  readonly ka: number;
}

/** Index of the lowest nonzero coefficient, or -1 for the zero polynomial. */
export function lowestNonzero(p: Poly): number {
  for (let k = 0; k < p.length; k++) if (p[k] !== 0) return k;
  return -1;
}

/** lim s^k N(s)/D(s) as s -> 0 given net integrator count n and ratio r of lowest coefficients. */
function limit(n: number, r: number, k: number): number {
  if (n > k) return r > 0 ? Infinity : -Infinity;
  return n === k ? r : 0;
}

/** System type, Kp, Kv, Ka of a loop. */
export function errorConstants(loop: TransferFunction): ErrorConstants {
  const a = lowestNonzero(loop.num);
  const b = lowestNonzero(loop.den);
  if (a < 0) return { systemType: 0, kp: 0, kv: 0, ka: 0 };
  const n = b - a;
  const r = loop.num[a]! / loop.den[b]!;
  return { systemType: Math.max(n, 0), kp: limit(n, r, 0), kv: limit(n, r, 1), ka: limit(n, r, 2) };
}

/** Closed-loop gain T(0) = lim N/(D+N) as s -> 0, exactly from the lowest coefficients (Infinity with a pole at 0). */
export function closedLoopDcGain(loop: TransferFunction): number {
  const len = Math.max(loop.num.length, loop.den.length);
  const c: number[] = [];
  for (let k = 0; k < len; k++) c.push((loop.num[k] ?? 0) + (loop.den[k] ?? 0));
  const a = lowestNonzero(loop.num);
  const b = lowestNonzero(c);
  if (a < 0) return 0;
  if (b < 0) return Infinity;
  if (a < b) return loop.num[a]! / c[b]! > 0 ? Infinity : -Infinity;
  return a === b ? loop.num[a]! / c[b]! : 0;
}
