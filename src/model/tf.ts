/**
 * Rational transfer functions in s (rad/s) with one optional pure delay.
 *
 * Coefficients are stored in ASCENDING powers of s: `p[k]` multiplies s^k.
 * So `[0, 20, 1]` is s^2 + 20 s, and `[400]` is the constant 400.
 * Ascending order makes the trailing-coefficient work (system type, error
 * constants, s -> 0 limits) read directly off the low indices.
 */

/** A real polynomial in s, ascending powers: p[k] multiplies s^k. Never empty; [0] is the zero polynomial. */
export type Poly = readonly number[];

/** N(s)/D(s) * exp(-delayS * s). Neither polynomial is cancelled against the other. */
export interface TransferFunction {
  readonly num: Poly;
  readonly den: Poly;
  /** Pure delay in seconds, >= 0. */
  readonly delayS: number;
}

/** A complex number as plain data (JSON-friendly). */
export interface Complex {
  readonly re: number;
  readonly im: number;
}

/** Measured open-loop or plant frequency response: one complex value per frequency. */
export interface FrequencyData {
  readonly wRadS: readonly number[];
  readonly re: readonly number[];
  readonly im: readonly number[];
}
