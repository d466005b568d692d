import type { Complex, TransferFunction } from '../model/tf.js';
import { factoredAt, type Factored } from './factors.js';
import { hypot2 } from './hypot.js';
import { polyAdd, polyMul, polyEvalComplexWithDerivative } from './poly.js';
import { polyRoots } from './roots.js';

/**
 * Closed-loop stability of the unity-feedback loop L = N/D e^{-sT}, decided on the
 * closed loop itself: the roots of D + N without delay, and with a delay the
 * argument principle applied to the entire function F(s) = D(s) + N(s) e^{-sT}.
 */

/** |F| below this many units of rounding (of evaluating F) counts as zero. */
const ROUNDING_MULTIPLE = 16;

/** A closed-loop pole counts as on the axis when |Re| is below this fraction of its magnitude. */
const AXIS_TOL = 1e-10;

/** Roots of D + N: the closed-loop poles of the delay-free loop. */
export function closedLoopPoles(loop: TransferFunction): Complex[] {
  return polyRoots(polyAdd(loop.den, loop.num));
}

/** 'stable' when every pole is strictly left of the axis, 'marginal' when one sits on it, else 'unstable'. */
export function classifyPoles(poles: readonly Complex[]): 'stable' | 'marginal' | 'unstable' {
  let worst: 'stable' | 'marginal' | 'unstable' = 'stable';
  for (const p of poles) {
    const tol = AXIS_TOL * Math.hypot(p.re, p.im);
    if (p.re > tol) return 'unstable';
    if (p.re >= -tol) worst = 'marginal';
  }
  return worst;
}

/** Result of the encirclement count: zeros of D + N e^{-sT} in the open right half-plane. */
export interface RhpCount {
  readonly count: number;
  /** False when the count came out non-integer (a closed-loop pole on or very near the axis). */
  readonly reliable: boolean;
}

/**
 * Counts right-half-plane zeros of F = D + N e^{-sT} (loop given factored, degrees
 * deg N <= deg D, |L(inf)| < 1). F is entire, so its argument along the jw axis is
 * continuous even where D has roots on the axis: no indentation is needed. With
 * n = deg D, Z = n/2 - (1/pi) [arg change of F over 0..w1 + arg change of D over
 * w1..inf - principal arg(1 + L(jw1))], valid when |L| < 1 for all w > w1 (so
 * 1 + L cannot wind beyond w1, and the large semicircle contributes n pi).
 */
export function rhpZeroCount(loop: TransferFunction, f: Factored, gainCrossoversRadS: readonly number[]): RhpCount {
  const n = f.poles.length;
  const dFac: Factored = { gain: 1, zeros: f.poles, poles: [], delayS: 0 };
  const nFac: Factored = { gain: f.gain, zeros: f.zeros, poles: [], delayS: f.delayS };
  const mags = [...f.poles, ...f.zeros].map((r) => Math.hypot(r.re, r.im)).filter((m) => m > 0);
  const lastCross = gainCrossoversRadS.length > 0 ? gainCrossoversRadS[gainCrossoversRadS.length - 1]! : 0;
  const firstScale = Math.min(...mags, ...gainCrossoversRadS.filter((w) => w > 0), f.delayS > 0 ? 1 / f.delayS : Infinity);
  const w1 = lastCross > 0 ? 2 * lastCross : (Number.isFinite(firstScale) ? firstScale : 1) * 1e-3;
  const wa = Math.min(Number.isFinite(firstScale) ? firstScale : 1, w1) * 1e-4;

  const vd = new Float64Array(4);
  const vn = new Float64Array(4);
  // Arg of F/max(|D|,|N e^{-jwT}|), plus the two term phases for the refinement test.
  const sample = (w: number): [number, number, number] => {
    factoredAt(dFac, w, vd);
    factoredAt(nFac, w, vn);
    const m = Math.max(vd[0]!, vn[0]!);
    const a = Math.exp(vd[0]! - m);
    const b = Math.exp(vn[0]! - m);
    const re = a * Math.cos(vd[1]!) + b * Math.cos(vn[1]!);
    const im = a * Math.sin(vd[1]!) + b * Math.sin(vn[1]!);
    return [Math.atan2(im, re), vd[1]!, vn[1]!];
  };
  const wrap = (x: number) => x - 2 * Math.PI * Math.round(x / (2 * Math.PI));
  let total = 0;
  let budget = 50000;
  const step = (w0: number, s0: [number, number, number], w1_: number, s1: [number, number, number], depth: number): void => {
    const dF = wrap(s1[0] - s0[0]);
    const turn = Math.abs(dF) > Math.PI / 4 || (w0 > 0 && (Math.abs(s1[1] - s0[1]) > Math.PI / 4 || Math.abs(s1[2] - s0[2]) > Math.PI / 4));
    if (!turn || depth > 60 || budget-- <= 0) { total += dF; return; }
    const wm = w0 > 0 ? Math.sqrt(w0 * w1_) : 0.5 * w1_;
    const sm = sample(wm);
    step(w0, s0, wm, sm, depth + 1);
    step(wm, sm, w1_, s1, depth + 1);
  };
  const nDec = Math.max(1, Math.ceil(Math.log10(w1 / wa) * 8));
  let wPrev = 0;
  let sPrev = sample(0);
  for (let i = 0; i <= nDec; i++) {
    const w = wa * (w1 / wa) ** (i / nDec);
    const s = sample(w);
    step(wPrev, sPrev, w, s, 0);
    wPrev = w;
    sPrev = s;
  }
  let tailD = 0;
  for (const p of f.poles) tailD += Math.PI / 2 - Math.atan2(w1 - p.im, 0 - p.re);
  const v = new Float64Array(4);
  factoredAt(f, w1, v);
  const lMag = Math.exp(v[0]!);
  const argOnePlusL = Math.atan2(lMag * Math.sin(v[1]!), 1 + lMag * Math.cos(v[1]!));
  const z = n / 2 - (total + tailD - argOnePlusL) / Math.PI;
  const count = Math.round(z) + 0; // never -0
  return { count, reliable: Math.abs(z - count) < 0.2 && budget > 0 && lMag < 1 };
}

/** Coefficients (ascending) of the (m, m) Pade approximant of e^{-sT}: [numerator, denominator]. */
export function padeDelay(delayS: number, m: number): [number[], number[]] {
  const num: number[] = [];
  const den: number[] = [];
  let c = 1;
  for (let k = 0; k <= m; k++) {
    // c_k = (2m-k)! m! / ((2m)! k! (m-k)!), built by the ratio c_{k+1}/c_k = (m-k)/((2m-k)(k+1)).
    const tk = c * delayS ** k;
    num.push(k % 2 === 0 ? tk : -tk);
    den.push(tk);
    c *= (m - k) / ((2 * m - k) * (k + 1));
  }
  return [num, den];
}

/** sum |a_k| r^k: what rounding in evaluating a at any s with |s| = r is measured against. */
function absPolyAt(a: readonly number[], r: number): number {
  let v = 0;
  for (let k = a.length - 1; k >= 0; k--) v = v * r + Math.abs(a[k]!);
  return v;
}

/**
 * Newton's method on F(s) = D(s) + N(s) e^{-sT} from s0; the root, or null when it
 * does not converge to a small residual. A point where F is zero to working
 * precision (below the rounding bound of evaluating it) is a root even when D and
 * N vanish there together: a compensator zero on a plant pole, whose cancelled
 * pole stays a closed-loop pole and must not be lost to rounding noise.
 */
function newtonDelayRoot(loop: TransferFunction, s0: Complex): Complex | null {
  const T = loop.delayS;
  let re = s0.re;
  let im = s0.im;
  for (let it = 0; it < 60; it++) {
    const [dr, di, ddr, ddi] = polyEvalComplexWithDerivative(loop.den, re, im);
    const [nr, ni, dnr, dni] = polyEvalComplexWithDerivative(loop.num, re, im);
    const mag = Math.exp(-T * re);
    const er = mag * Math.cos(T * im);
    const ei = -mag * Math.sin(T * im);
    const ner = nr * er - ni * ei;
    const nei = nr * ei + ni * er;
    const fr = dr + ner;
    const fi = di + nei;
    const r = hypot2(re, im);
    if (hypot2(fr, fi) <= ROUNDING_MULTIPLE * Number.EPSILON * (absPolyAt(loop.den, r) + mag * absPolyAt(loop.num, r))) return { re, im };
    // F' = D' + (N' - T N) e^{-sT}
    const gr = dnr - T * nr;
    const gi = dni - T * ni;
    const fpr = ddr + gr * er - gi * ei;
    const fpi = ddi + gr * ei + gi * er;
    const den = fpr * fpr + fpi * fpi;
    if (!Number.isFinite(den) || den === 0) return null;
    const sr = (fr * fpr + fi * fpi) / den;
    const si = (fi * fpr - fr * fpi) / den;
    re -= sr;
    im -= si;
    const scale = hypot2(dr, di) + hypot2(ner, nei);
    if (hypot2(sr, si) <= 1e-15 * hypot2(re, im)) {
      return hypot2(fr, fi) <= 1e-10 * scale ? { re, im } : null;
    }
  }
  return null;
}

/**
 * Closed-loop poles of a delay loop: the roots of a Pade approximant only serve as
 * starting points; each is refined by Newton's method on the exact equation
 * D + N e^{-sT} = 0. There are infinitely many roots: this lists those reached.
 */
export function delayClosedLoopPoles(loop: TransferFunction, padeOrder = 12): Complex[] {
  const [pn, pd] = padeDelay(loop.delayS, padeOrder);
  const seeds = polyRoots(polyAdd(polyMul(loop.den, pd), polyMul(loop.num, pn)));
  const found: Complex[] = [];
  for (const seed of seeds) {
    if (seed.im < 0) continue;
    const r = newtonDelayRoot(loop, seed);
    if (r === null || r.im < -1e-9 * Math.hypot(r.re, r.im)) continue;
    const m = Math.hypot(r.re, r.im);
    const root = Math.abs(r.im) <= 1e-10 * m ? { re: r.re, im: 0 } : r;
    if (found.some((f) => Math.hypot(f.re - root.re, f.im - root.im) <= 1e-8 * m)) continue;
    found.push(root);
  }
  return found.flatMap((r) => (r.im === 0 ? [r] : [r, { re: r.re, im: -r.im }]));
}
