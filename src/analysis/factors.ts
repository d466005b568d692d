import type { Complex, Poly, TransferFunction } from '../model/tf.js';
import { polyEvalJw, polyScaleVariable, polyTrim } from './poly.js';
import { hypot2 } from './hypot.js';
import { polyRoots } from './roots.js';

/**
 * A transfer function held as gain, zeros, poles and delay. Evaluating on the jw
 * axis in this form sums per-factor logarithms and angles, so it neither overflows
 * for high orders nor loses digits when corners span many decades, and its phase
 * is continuous (no 360 deg jumps) by construction.
 */
export interface Factored {
  /** Ratio of the leading coefficients num/den (0 for a zero numerator). */
  readonly gain: number;
  readonly zeros: readonly Complex[];
  readonly poles: readonly Complex[];
  readonly delayS: number;
  /**
   * Optional exact polynomials for evaluation: numerator and denominator in sigma = s/w0,
   * each normalised, with ln of the factor they were divided by. Roots of clustered
   * (repeated) factors carry errors of order eps^(1/multiplicity); values from the
   * coefficients do not, so when present they give |G| and the phase, and the factors
   * only pick the phase branch (continuity) and the derivatives.
   */
  readonly poly?: { readonly num: Poly; readonly den: Poly; readonly w0: number; readonly logScale: number };
}

/** Leading (highest-power) coefficient. */
function lead(p: Poly): number {
  const t = polyTrim(p);
  return t[t.length - 1]!;
}

/** A power of two near the geometric middle of the given frequencies (1 when none): the scale s = w0 sigma that keeps coefficients moderate. */
export function middleScaleRadS(magsRadS: readonly number[]): number {
  const ms = magsRadS.filter((m) => m > 0 && Number.isFinite(m));
  if (ms.length === 0) return 1;
  return 2 ** Math.round(0.5 * (Math.log2(Math.min(...ms)) + Math.log2(Math.max(...ms))));
}

/** Polynomial scaled to sigma = s/w0 and divided by its largest coefficient: [coefficients, ln(divisor)]. */
function scaledPoly(p: Poly, w0: number): [number[], number] {
  const q = polyScaleVariable(polyTrim(p), w0);
  const m = Math.max(...q.map(Math.abs));
  return [q.map((c) => c / m), Math.log(m)];
}

/** Factors tf; pass known roots to skip root finding. Roots exactly on the axis keep a +0 real part. */
export function factorTf(tf: TransferFunction, zeros?: readonly Complex[], poles?: readonly Complex[]): Factored {
  const n = polyTrim(tf.num);
  const zeroNum = n.length === 1 && n[0] === 0;
  const clean = (rs: readonly Complex[]) => rs.map((r) => ({ re: r.re + 0, im: r.im + 0 }));
  const z = zeroNum ? [] : clean(zeros ?? polyRoots(tf.num));
  const p = clean(poles ?? polyRoots(tf.den));
  const w0 = middleScaleRadS([...z, ...p].map((r) => Math.hypot(r.re, r.im)));
  const [pn, ln] = scaledPoly(tf.num, w0);
  const [pd, ld] = scaledPoly(tf.den, w0);
  const poly = zeroNum || !Number.isFinite(ln - ld) ? undefined : { num: pn, den: pd, w0, logScale: ln - ld };
  return { gain: zeroNum ? 0 : lead(tf.num) / lead(tf.den), zeros: z, poles: p, delayS: tf.delayS, ...(poly ? { poly } : {}) };
}

/** Angle wrapped into (-pi, pi]. */
function wrapAngle(x: number): number {
  return x - 2 * Math.PI * Math.ceil((x - Math.PI) / (2 * Math.PI));
}

/**
 * Values at s = jw written into out: [0] ln|G|, [1] unwrapped phase (rad, delay included),
 * [2] d ln|G| / dw, [3] d phase / dw. Returns out.
 */
export function factoredAt(f: Factored, w: number, out: Float64Array): Float64Array {
  let ph = f.gain < 0 ? -Math.PI : 0;
  let dlm = 0;
  let dph = -f.delayS;
  for (const z of f.zeros) {
    const x = 0 - z.re;
    const y = w - z.im;
    const r2 = x * x + y * y;
    ph += Math.atan2(y, x);
    dlm += y / r2;
    dph += x / r2;
  }
  for (const p of f.poles) {
    const x = 0 - p.re;
    const y = w - p.im;
    const r2 = x * x + y * y;
    ph -= Math.atan2(y, x);
    dlm -= y / r2;
    dph -= x / r2;
  }
  let lm = Number.NaN;
  let fromPoly = false;
  if (f.poly) {
    // Value from the coefficients; the factor sum only chooses the branch of the phase.
    const x = w / f.poly.w0;
    const [nr, ni] = polyEvalJw(f.poly.num, x);
    const [dr, di] = polyEvalJw(f.poly.den, x);
    const mn = hypot2(nr, ni);
    const md = hypot2(dr, di);
    if (mn > 0 && md > 0 && Number.isFinite(mn) && Number.isFinite(md)) {
      lm = f.poly.logScale + Math.log(mn / md);
      ph += wrapAngle(Math.atan2(ni * dr - nr * di, nr * dr + ni * di) - ph);
      fromPoly = true;
    }
  }
  // The magnitude from the factors, only where the coefficients gave none (the logarithms cost a third of a call).
  if (!fromPoly) lm = factorLogMag(f, w);
  out[0] = lm;
  out[1] = ph - w * f.delayS;
  out[2] = dlm;
  out[3] = dph;
  return out;
}

/** ln|G(jw)| summed over the factors. */
function factorLogMag(f: Factored, w: number): number {
  let lm = f.gain === 0 ? -Infinity : Math.log(Math.abs(f.gain));
  for (const z of f.zeros) {
    const x = 0 - z.re;
    const y = w - z.im;
    lm += 0.5 * Math.log(x * x + y * y);
  }
  for (const p of f.poles) {
    const x = 0 - p.re;
    const y = w - p.im;
    lm -= 0.5 * Math.log(x * x + y * y);
  }
  return lm;
}
