import type { TransferFunction } from '../model/tf.js';
import { factorTf, factoredAt, type Factored } from './factors.js';

/** Frequency response on given frequencies, with phase unwrapped continuously. */
export interface FrequencyResponse {
  readonly wRadS: Float64Array;
  readonly re: Float64Array;
  readonly im: Float64Array;
  readonly magDb: Float64Array;
  /** Unwrapped: sum of factor angles minus w*delay, so no 360 deg jumps. */
  readonly phaseDeg: Float64Array;
}

const DB_PER_NEPER = 20 / Math.LN10;

/** n log-spaced frequencies from wMin to wMax inclusive (rad/s). */
export function logGridRadS(wMinRadS: number, wMaxRadS: number, n: number): Float64Array {
  const out = new Float64Array(n);
  if (n === 1) { out[0] = wMinRadS; return out; }
  const a = Math.log(wMinRadS);
  const step = (Math.log(wMaxRadS) - a) / (n - 1);
  for (let i = 0; i < n; i++) out[i] = Math.exp(a + i * step);
  out[n - 1] = wMaxRadS;
  return out;
}

/** G(jw) at each frequency; pass a Factored form to reuse known roots. */
export function frequencyResponse(tf: TransferFunction | Factored, wRadS: ArrayLike<number>): FrequencyResponse {
  const f = 'gain' in tf ? tf : factorTf(tf);
  const n = wRadS.length;
  const res = {
    wRadS: Float64Array.from(wRadS),
    re: new Float64Array(n),
    im: new Float64Array(n),
    magDb: new Float64Array(n),
    phaseDeg: new Float64Array(n),
  };
  const v = new Float64Array(4);
  for (let i = 0; i < n; i++) {
    factoredAt(f, res.wRadS[i]!, v);
    const m = Math.exp(v[0]!);
    res.re[i] = m * Math.cos(v[1]!);
    res.im[i] = m * Math.sin(v[1]!);
    res.magDb[i] = v[0]! * DB_PER_NEPER;
    res.phaseDeg[i] = (v[1]! * 180) / Math.PI;
  }
  return res;
}

/** Magnitudes of the nonzero roots (corner frequencies) and 1/delay, in rad/s. */
export function cornerFrequenciesRadS(f: Factored): number[] {
  const out: number[] = [];
  for (const r of [...f.zeros, ...f.poles]) {
    const m = Math.hypot(r.re, r.im);
    if (m > 0 && Number.isFinite(m)) out.push(m);
  }
  if (f.delayS > 0) out.push(1 / f.delayS);
  return out;
}

/**
 * A frequency range that shows the whole story of a loop: two decades below the
 * lowest corner (or given frequency, e.g. a crossover) to two decades above the highest.
 */
export function frequencyRangeRadS(tf: TransferFunction | Factored, extraRadS: readonly number[] = []): [number, number] {
  const f = 'gain' in tf ? tf : factorTf(tf);
  const ws = [...cornerFrequenciesRadS(f), ...extraRadS.filter((w) => w > 0 && Number.isFinite(w))];
  if (ws.length === 0) {
    // Only gain and integrators/differentiators: centre on where |G| = 1 if that exists.
    const k = Math.abs(f.gain);
    const rel = f.poles.length - f.zeros.length;
    ws.push(rel !== 0 && k > 0 ? k ** (1 / rel) : 1);
  }
  let lo = Infinity;
  let hi = 0;
  for (const w of ws) { lo = Math.min(lo, w); hi = Math.max(hi, w); }
  return [lo / 100, hi * 100];
}

/**
 * Evaluation frequencies for a loop: pointsPerDecade log-spaced points on [lo, hi]
 * plus points around each lightly damped root (at its natural frequency and
 * +/- a few bandwidths), where magnitude and phase change quickly. Sorted, unique.
 */
export function loopGridRadS(f: Factored, loRadS: number, hiRadS: number, pointsPerDecade = 24): Float64Array {
  const decades = Math.max(Math.log10(hiRadS / loRadS), 0.1);
  const base = logGridRadS(loRadS, hiRadS, Math.ceil(decades * pointsPerDecade) + 1);
  const extra: number[] = [];
  for (const r of [...f.zeros, ...f.poles]) {
    const wn = Math.abs(r.im);
    if (wn <= 0) continue;
    const half = Math.abs(r.re);
    extra.push(wn);
    for (const k of [0.5, 1, 2, 4]) {
      if (wn - k * half > 0) extra.push(wn - k * half);
      extra.push(wn + k * half);
    }
  }
  const all = Float64Array.from([...base, ...extra.filter((w) => w >= loRadS && w <= hiRadS)]);
  all.sort();
  let m = 0;
  for (let i = 0; i < all.length; i++) {
    if (m === 0 || all[i]! > all[m - 1]! * (1 + 1e-12)) all[m++] = all[i]!;
  }
  return all.slice(0, m);
}
