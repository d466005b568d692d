import type { StepMetrics } from '../model/metrics.js';
import { cubicFirstUpCrossing, cubicLastCrossing, cubicRange, hermiteCubic, type Cubic } from './step-cubic.js';
import { STEP_ERR_BUDGET } from './step-plan.js';
import type { StepTrace } from './step-sim.js';

/**
 * Step metrics (DESIGN.md, "Step metrics") read off a simulated trace, with every
 * extreme and crossing refined on the cubic Hermite piece of its step rather than
 * taken at a sample.
 */

/** Settling band half-width, as a fraction of the final value. */
export const SETTLING_BAND = 0.02;

/** Result of the scan: the metrics, and whether the response had settled by the end of the trace. */
export interface TraceMetrics {
  readonly metrics: StepMetrics;
  readonly settled: boolean;
}

/** The normalised output z = y / yF on step k as a cubic in s in [0, 1]. */
function zPiece(tr: StepTrace, k: number, inv: number, out: Cubic): Cubic {
  const h = tr.tS[k + 1]! - tr.tS[k]!;
  return hermiteCubic(tr.yPlus[k]! * inv, tr.yMinus[k + 1]! * inv, tr.dyStart[k]! * h * inv, tr.dyEnd[k]! * h * inv, out);
}

/** First time z rises to level (jumps at grid points count), or null. */
function firstUpCrossingS(tr: StepTrace, inv: number, level: number): number | null {
  const steps = tr.tS.length - 1;
  const c: Cubic = [0, 0, 0, 0];
  for (let k = 0; k < steps; k++) {
    const zm = k === 0 ? 0 : tr.yMinus[k]! * inv;
    if (zm < level && tr.yPlus[k]! * inv >= level) return tr.tS[k]!;
    zPiece(tr, k, inv, c);
    const s = cubicFirstUpCrossing(c, level);
    if (s >= 0) return tr.tS[k]! + s * (tr.tS[k + 1]! - tr.tS[k]!);
  }
  return null;
}

/** Max |u| over the trace, including the jump at 0+, refined on each step's cubic. */
function peakEffort(tr: StepTrace): number {
  const steps = tr.tS.length - 1;
  const c: Cubic = [0, 0, 0, 0];
  let best = 0;
  for (let k = 0; k < steps; k++) {
    const h = tr.tS[k + 1]! - tr.tS[k]!;
    hermiteCubic(tr.uPlus[k]!, tr.uMinus[k + 1]!, tr.duStart[k]! * h, tr.duEnd[k]! * h, c);
    const r = cubicRange(c);
    best = Math.max(best, Math.abs(r.max), Math.abs(r.min));
  }
  return steps === 0 ? Math.abs(tr.uPlus[0]!) : best;
}

/** Metrics of a trace whose exact final value is yF (nonzero). */
export function traceMetrics(tr: StepTrace, yF: number): TraceMetrics {
  const inv = 1 / yF;
  const steps = tr.tS.length - 1;
  const c: Cubic = [0, 0, 0, 0];
  let zMax = tr.yPlus[0]! * inv, tMax = 0;
  let zMin = zMax;
  let lastOutside = -1;
  const outside = (z: number) => Math.abs(z - 1) > SETTLING_BAND;
  for (let k = 0; k < steps; k++) {
    zPiece(tr, k, inv, c);
    const r = cubicRange(c);
    const h = tr.tS[k + 1]! - tr.tS[k]!;
    if (r.max > zMax) { zMax = r.max; tMax = tr.tS[k]! + r.sMax * h; }
    if (r.min < zMin) zMin = r.min;
    if (outside(r.max) || outside(r.min)) lastOutside = k;
  }
  let settling: number | null = 0;
  let settled = true;
  if (lastOutside === steps - 1 && outside(tr.yMinus[steps]! * inv)) {
    settled = false;
    settling = null;
  } else if (lastOutside >= 0) {
    const k = lastOutside;
    const h = tr.tS[k + 1]! - tr.tS[k]!;
    if (outside(tr.yMinus[k + 1]! * inv)) {
      // It leaves the band by a jump at the grid point.
      settling = tr.tS[k + 1]!;
    } else {
      zPiece(tr, k, inv, c);
      const s = Math.max(cubicLastCrossing(c, 1 + SETTLING_BAND), cubicLastCrossing(c, 1 - SETTLING_BAND));
      settling = tr.tS[k]! + Math.max(s, 0) * h;
    }
  }
  const t10 = firstUpCrossingS(tr, inv, 0.1);
  const t90 = firstUpCrossingS(tr, inv, 0.9);
  // A peak within the simulation's error budget is not a finding either (a flat response would get a random peak time).
  const overshoot = zMax - 1 > STEP_ERR_BUDGET ? 100 * (zMax - 1) : 0;
  return {
    metrics: {
      overshootPct: overshoot,
      // A dip within the simulation's error budget is not a finding.
      undershootPct: zMin < -STEP_ERR_BUDGET ? -100 * zMin : 0,
      riseTimeS: t10 !== null && t90 !== null ? t90 - t10 : null,
      settlingTimeS: settling,
      peakTimeS: overshoot > 0 ? tMax : null,
      finalValue: yF,
      peakEffort: peakEffort(tr),
    },
    settled,
  };
}

/** Metrics when the exact final value is zero: no percentages or times exist, only the effort. */
export function zeroFinalValueMetrics(tr: StepTrace): StepMetrics {
  return { overshootPct: 0, undershootPct: 0, riseTimeS: null, settlingTimeS: null, peakTimeS: null, finalValue: 0, peakEffort: peakEffort(tr) };
}
