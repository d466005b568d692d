import type { Factored } from './factors.js';
import { factoredAt } from './factors.js';
import { wrapPi } from './crossovers.js';

/**
 * Phase, gain and delay margins from crossover frequencies (DESIGN.md, "Conventions").
 * Every margin is listed; the reported one is the one of smallest magnitude.
 */

const DB_PER_NEPER = 20 / Math.LN10;
const DEG = 180 / Math.PI;

/** PM = 180 + angle L(jw_c) wrapped into (-180, 180], one per gain crossover. */
export function phaseMarginsDeg(f: Factored, crossoversRadS: readonly number[]): number[] {
  const v = new Float64Array(4);
  return crossoversRadS.map((w) => wrapPi(factoredAt(f, w, v)[1]! + Math.PI) * DEG);
}

/**
 * GM = -20 log10 |L(jw_p)| dB, one per phase crossover. Frequency 0 stands for L(0)
 * and Infinity for L(inf); their values are given since the factored form cannot
 * evaluate the limits.
 */
export function gainMarginsDb(f: Factored, crossoversRadS: readonly number[], l0: number, lInf: number): number[] {
  const v = new Float64Array(4);
  return crossoversRadS.map((w) => {
    if (w === 0) return -20 * Math.log10(Math.abs(l0));
    if (w === Infinity) return -20 * Math.log10(Math.abs(lInf));
    return -factoredAt(f, w, v)[0]! * DB_PER_NEPER;
  });
}

/** Index of the entry of smallest magnitude (first on ties), or -1 when empty. */
function smallestMagnitude(xs: readonly number[]): number {
  let best = -1;
  for (let i = 0; i < xs.length; i++) if (best < 0 || Math.abs(xs[i]!) < Math.abs(xs[best]!)) best = i;
  return best;
}

/** The reported margin (smallest magnitude, signed) and where it occurs; nulls when there is none. */
export function reportedMargin(values: readonly number[], atRadS: readonly number[]): { value: number | null; atRadS: number | null } {
  const i = smallestMagnitude(values);
  return i < 0 ? { value: null, atRadS: null } : { value: values[i]!, atRadS: atRadS[i]! };
}

/** Smallest positive gain margin (how far the gain may rise), or null. */
export function upperGainMarginDb(gms: readonly number[]): number | null {
  const pos = gms.filter((g) => g > 0);
  return pos.length === 0 ? null : Math.min(...pos);
}

/** Largest negative gain margin (how far the gain may fall), or null. */
export function lowerGainMarginDb(gms: readonly number[]): number | null {
  const neg = gms.filter((g) => g < 0);
  return neg.length === 0 ? null : Math.max(...neg);
}

/**
 * Smallest added delay that destabilises a stable loop: min over gain crossovers of
 * (PM taken in (0, 360] deg, in rad) / w_c. Infinity when no crossover exists and
 * |L(inf)| < 1; 0 when |L(inf)| > 1 (any delay then destabilises); null when unstable.
 */
export function delayMarginS(stable: boolean, crossoversRadS: readonly number[], pmsDeg: readonly number[], lInfMag: number): number | null {
  if (!stable) return null;
  if (lInfMag > 1) return 0;
  let best = Infinity;
  for (let i = 0; i < crossoversRadS.length; i++) {
    let pm = pmsDeg[i]! % 360;
    if (pm <= 0) pm += 360;
    best = Math.min(best, pm / DEG / crossoversRadS[i]!);
  }
  return best;
}
