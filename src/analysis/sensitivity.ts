import { factoredAt, type Factored } from './factors.js';
import { hypot2 } from './hypot.js';
import type { LoopSamples } from './loop-samples.js';
import { brentMin, brentRoot } from './scalar.js';

/**
 * Peak sensitivity Ms = max |S|, peak complementary sensitivity Mt = max |T| and the
 * closed-loop bandwidth. Peaks are bracketed on the sample grid and refined by Brent's
 * minimiser in log frequency; the limits at w -> 0 and w -> infinity count.
 */

export interface Peak {
  readonly value: number;
  /** Where the peak is; 0 or Infinity for a limit, null when not located. */
  readonly atRadS: number | null;
}

/** |1 + L| and |L| from ln|L| and phase. */
function closedLoopMags(logMag: number, phaseRad: number): [number, number] {
  const m = Math.exp(logMag);
  if (!Number.isFinite(m)) return [Infinity, Infinity];
  return [hypot2(1 + m * Math.cos(phaseRad), m * Math.sin(phaseRad)), m];
}

/** |S| = 1/|1+L| and |T| = |L|/|1+L| at w. */
function sAndT(f: Factored, w: number, v: Float64Array): [number, number] {
  factoredAt(f, w, v);
  const [onePlus, m] = closedLoopMags(v[0]!, v[1]!);
  if (m === Infinity) return [0, 1];
  return [1 / onePlus, m / onePlus];
}

/** Limits of |S| and |T| as w -> 0 given L(0) (possibly infinite). */
export function limitsAtZero(l0: number): [number, number] {
  if (!Number.isFinite(l0)) return [0, 1];
  return [1 / Math.abs(1 + l0), Math.abs(l0) / Math.abs(1 + l0)];
}

/**
 * Suprema of |S| and |T| as w -> infinity given L(inf) (delay-free: a real number).
 * With a delay, L(jw) keeps turning around a circle of radius |L(inf)|, so the
 * supremum is taken where that circle comes nearest -1.
 */
export function limitsAtInfinity(lInf: number, hasDelay: boolean): [number, number] {
  if (!Number.isFinite(lInf)) return [0, 1];
  if (!hasDelay || lInf === 0) return [1 / Math.abs(1 + lInf), Math.abs(lInf) / Math.abs(1 + lInf)];
  const r = Math.abs(lInf);
  return r >= 1 ? [Infinity, Infinity] : [1 / (1 - r), r / (1 - r)];
}

/** Refined maximum of g over the samples (local maxima within 20 % of the best grid value are polished). */
function refinedMax(f: Factored, s: LoopSamples, pick: 0 | 1): Peak {
  const v = new Float64Array(4);
  const n = s.wRadS.length;
  const vals = new Float64Array(n);
  let best = -Infinity;
  for (let i = 0; i < n; i++) {
    const [onePlus, m] = closedLoopMags(s.logMag[i]!, s.phaseRad[i]!);
    vals[i] = m === Infinity ? (pick === 0 ? 0 : 1) : (pick === 0 ? 1 / onePlus : m / onePlus);
    best = Math.max(best, vals[i]!);
  }
  let peak: Peak = { value: -Infinity, atRadS: null };
  for (let i = 0; i < n; i++) {
    const here = vals[i]!;
    const left = i > 0 ? vals[i - 1]! : -Infinity;
    const right = i + 1 < n ? vals[i + 1]! : -Infinity;
    if (!(here >= left && here >= right) || here < 0.8 * best) continue;
    let at = s.wRadS[i]!;
    let val = here;
    if (i > 0 && i + 1 < n && Number.isFinite(here)) {
      const [u, negVal] = brentMin((x) => -sAndT(f, Math.exp(x), v)[pick], Math.log(s.wRadS[i - 1]!), Math.log(s.wRadS[i + 1]!), 1e-11);
      if (-negVal >= val) { val = -negVal; at = Math.exp(u); }
    }
    if (val > peak.value) peak = { value: val, atRadS: at };
  }
  return peak;
}

/** Beyond this |S| or |T|, 1 + L is zero to double precision: a closed-loop pole on the axis. */
const NUMERICALLY_INFINITE = 1e10;

/** Larger of an interior peak and the two limits; ties go to the interior peak. */
function withLimits(interior: Peak, atZero: number, atInf: number): Peak {
  let p = interior.value > NUMERICALLY_INFINITE ? { value: Infinity, atRadS: interior.atRadS } : interior;
  if (atZero > p.value * (1 + 1e-12)) p = { value: atZero, atRadS: 0 };
  if (atInf > p.value * (1 + 1e-12)) p = { value: atInf, atRadS: Infinity };
  return p;
}

/** Ms: peak of |S(jw)| over the samples, refined, with the limits at 0 and infinity. */
export function peakSensitivity(f: Factored, s: LoopSamples, l0: number, lInf: number): Peak {
  return withLimits(refinedMax(f, s, 0), limitsAtZero(l0)[0], limitsAtInfinity(lInf, f.delayS > 0)[0]);
}

/** Mt: peak of |T(jw)| over the samples, refined, with the limits at 0 and infinity. */
export function peakComplementary(f: Factored, s: LoopSamples, l0: number, lInf: number): Peak {
  return withLimits(refinedMax(f, s, 1), limitsAtZero(l0)[1], limitsAtInfinity(lInf, f.delayS > 0)[1]);
}

/** Lowest w where |T(jw)| falls below |T(0)|/sqrt(2); null when T(0) is 0 or |T| never falls that far. */
export function bandwidthRadS(f: Factored, s: LoopSamples, t0: number): number | null {
  if (t0 === 0 || !Number.isFinite(t0)) return null;
  const thr = Math.abs(t0) / Math.SQRT2;
  const v = new Float64Array(4);
  const g = (u: number) => sAndT(f, Math.exp(u), v)[1] - thr;
  const ws = s.wRadS;
  if (ws.length === 0) return null;
  if (g(Math.log(ws[0]!)) < 0) {
    // Already below at the lowest sample: the drop lies lower still (|T| -> |T(0)| as w -> 0).
    const lo = Math.log(ws[0]!) - 12 * Math.LN10;
    const u = g(lo) >= 0 ? brentRoot(g, lo, Math.log(ws[0]!)) : Number.NaN;
    return Number.isFinite(u) ? Math.exp(u) : null;
  }
  for (let i = 1; i < ws.length; i++) {
    const [onePlus, m] = closedLoopMags(s.logMag[i]!, s.phaseRad[i]!);
    const t = m === Infinity ? 1 : m / onePlus;
    if (t < thr) return Math.exp(brentRoot(g, Math.log(ws[i - 1]!), Math.log(ws[i]!)));
  }
  return null;
}
