import type { Complex, Poly, TransferFunction } from '../model/tf.js';
import { polyAdd, polyDerivative, polyEvalComplex, polyMul, polyScale } from './poly.js';

/**
 * How long and how finely to simulate a step, from the closed-loop modes.
 *
 * Each mode p contributes r e^(pt) to y, with r the residue of Y(s)/s at p. It must be
 * followed until |r| e^(Re(p) t) is far below the settling band (duration), and while it
 * is alive the step must resolve it (|p| h small) so that the cubic pieces stay exact to
 * the error budget below. Weighting by |r| keeps a nearly cancelled slow pole (a PI zero
 * beside a closed-loop pole) from stretching the run, and a tiny fast pole from
 * shrinking the step.
 */

/** A closed-loop mode with the size of its contribution to y and to u. */
export interface Mode {
  readonly p: Complex;
  readonly yAmp: number;
  readonly uAmp: number;
}

/** a / b for complex numbers given as pairs. */
function cdiv(ar: number, ai: number, br: number, bi: number): [number, number] {
  const d = br * br + bi * bi;
  return [(ar * br + ai * bi) / d, (ai * br - ar * bi) / d];
}

/**
 * Residue sizes of Y/s and U/s at each pole, for the loop with characteristic function
 * Delta(s) = Dc Dp + Nc Np e^(-sT): res = N(p) e^(-pT) / (p Delta'(p)). At a repeated
 * (or numerically split) pole Delta' is near zero and the size is huge: that is the
 * cautious answer, since such modes carry t^k e^(pt) terms.
 */
export function loopModes(plant: TransferFunction, comp: TransferFunction, poles: readonly Complex[]): Mode[] {
  const delayS = plant.delayS + comp.delayS;
  const n: Poly = polyMul(comp.num, plant.num);
  const d: Poly = polyMul(comp.den, plant.den);
  const nu: Poly = polyMul(comp.num, plant.den);
  const dn = polyDerivative(n);
  const dd = polyDerivative(d);
  // Delta' = D' + (N' - T N) e^(-sT)
  const nPrime = polyAdd(dn, polyScale(n, -delayS));
  return poles.filter((p) => Number.isFinite(p.re) && Number.isFinite(p.im)).map((p) => {
    const eMag = Math.exp(-p.re * delayS);
    const er = eMag * Math.cos(-p.im * delayS);
    const ei = eMag * Math.sin(-p.im * delayS);
    const [ddr, ddi] = polyEvalComplex(dd, p.re, p.im);
    const [npr, npi] = polyEvalComplex(nPrime, p.re, p.im);
    const derr = ddr + npr * er - npi * ei;
    const deri = ddi + npr * ei + npi * er;
    // Denominator p Delta'(p).
    const qr = p.re * derr - p.im * deri;
    const qi = p.re * deri + p.im * derr;
    const [yr, yi] = polyEvalComplex(n, p.re, p.im);
    const [ur, ui] = polyEvalComplex(nu, p.re, p.im);
    const [ry, iy] = cdiv(yr * er - yi * ei, yr * ei + yi * er, qr, qi);
    const [ru, iu] = cdiv(ur, ui, qr, qi);
    const yAmp = Math.hypot(ry, iy);
    const uAmp = Math.hypot(ru, iu);
    return { p, yAmp: Number.isFinite(yAmp) ? yAmp : Infinity, uAmp: Number.isFinite(uAmp) ? uAmp : Infinity };
  });
}

/** One stretch of the grid: steps of stride base steps each. */
export interface PlanLevel {
  readonly stride: number;
  readonly steps: number;
}

/**
 * Simulation plan. The grid starts with steps of h0 and doubles the step whenever every
 * mode that the longer step could not follow has died away (a stiff loop would need
 * millions of uniform steps). With a delay, h0 = T / delayTicks with delayTicks a power of
 * two and the step never exceeds T, so t - T is always a grid point of the past.
 */
export interface StepPlan {
  readonly h0S: number;
  /** The delay in base steps (a power of two), or 0 without delay. */
  readonly delayTicks: number;
  readonly levels: readonly PlanLevel[];
  readonly durationS: number;
  /** True when the run stops before the modes have died (too many steps needed). */
  readonly cut: boolean;
  readonly warnings: string[];
}

/**
 * Interpolation error budget, as a fraction of the scale: a cubic Hermite piece through
 * exact values and slopes misses a mode of size w by about w (|p| h)^4 / 384 (and at
 * worst by w itself). 1e-4 keeps overshoot within 0.01 percentage points and times within
 * about 1e-4 relative, far inside the 0.2 pp / 1 % the results are promised to.
 */
export const STEP_ERR_BUDGET = 1e-4;
const ERR = STEP_ERR_BUDGET;

/** Interpolation error of a mode of size w with step h. */
function pieceError(m: Weighted, hS: number): number {
  const x = m.mag * hS;
  return m.weight * Math.min(1, (x * x * x * x) / 384);
}

/** The longest step that keeps this mode within the budget from the start. */
function stepFor(m: Weighted): number {
  return m.weight <= ERR || m.mag === 0 ? Infinity : Math.pow((384 * ERR) / m.weight, 0.25) / m.mag;
}

/** Modes are followed until they fall to this fraction of the final value. */
const TAIL = 1e-4;
/** Fewest steps over the whole run, so that slow responses are drawn smoothly. */
const MIN_STEPS = 200;

/** Where steps may exceed the delay: never before longStepsFromS. */
interface DelayLimits {
  readonly ticks: number;
  readonly longStepsFromS: number;
}

interface Weighted {
  mag: number;
  sigma: number;
  weight: number;
}

/** The levels for a base step h0 up to durationS, cut short after maxSteps steps. */
function schedule(ms: readonly Weighted[], h0S: number, hMaxS: number, delay: DelayLimits, durationS: number, maxSteps: number): { levels: PlanLevel[]; cut: boolean } {
  const levels: PlanLevel[] = [];
  let tick = 0;
  let stride = 1;
  let left = maxSteps;
  const endTick = durationS / h0S;
  for (;;) {
    const next = stride * 2;
    let switchS = Infinity;
    if (next * h0S <= hMaxS) {
      // Steps longer than the delay only once its jumps and kinks have faded.
      switchS = delay.ticks > 0 && next > delay.ticks ? delay.longStepsFromS : 0;
      for (const m of ms) {
        // The longer step waits until this mode has decayed enough for it.
        const e = pieceError(m, next * h0S);
        if (e > ERR) switchS = Math.max(switchS, m.sigma > 0 ? Math.log(e / ERR) / m.sigma : Infinity);
      }
    }
    const switchTick = switchS / h0S;
    const last = switchTick >= endTick;
    let steps = last ? Math.max(1, Math.ceil((endTick - tick) / stride)) : Math.max(0, Math.ceil((switchTick - tick) / stride));
    // The next level starts on a multiple of its own stride.
    if (!last && (tick / stride + steps) % 2 === 1) steps++;
    if (steps > left) {
      levels.push({ stride, steps: left });
      return { levels, cut: true };
    }
    if (steps > 0) levels.push({ stride, steps });
    if (last) return { levels, cut: false };
    left -= steps;
    tick += steps * stride;
    stride = next;
  }
}

/**
 * Duration and grid from the closed-loop modes; yScale and uScale are the sizes against
 * which mode amplitudes count; openLoopPoles act alone while the delay holds the loop
 * open, so they must be resolved too.
 */
export function planStep(
  modes: readonly Mode[],
  openLoopPoles: readonly Complex[],
  delayS: number,
  echoRatio: number,
  yScale: number,
  uScale: number,
  opts: { durationS?: number; maxSamples?: number },
): StepPlan {
  const warnings: string[] = [];
  const maxSamples = Math.max(10, Math.floor(opts.maxSamples ?? 20_000));
  const ms: Weighted[] = modes.map(({ p, yAmp, uAmp }) => ({ mag: Math.hypot(p.re, p.im), sigma: -p.re, weight: Math.max(yAmp / yScale, uAmp / uScale) }));
  let tEnd = 0;
  for (const m of ms) {
    if (m.sigma > 0) tEnd = Math.max(tEnd, Math.min(Math.log(m.weight / TAIL), 40) / m.sigma);
    else if (m.weight > TAIL) tEnd = Math.max(tEnd, 20 / Math.max(m.mag, 1e-12));
  }
  for (const p of openLoopPoles) ms.push({ mag: Math.hypot(p.re, p.im), sigma: -p.re, weight: 1 });
  const hFineS = Math.min(...ms.map(stepFor));
  if (tEnd === 0) tEnd = Number.isFinite(hFineS) ? 40 * hFineS : 1;
  tEnd += 2 * delayS;
  const durationS = opts.durationS ?? tEnd;
  const hMaxS = durationS / MIN_STEPS;
  let h0S = Math.min(hFineS, hMaxS);
  let delayTicks = 0;
  if (delayS > 0) {
    delayTicks = 2 ** Math.max(0, Math.ceil(Math.log2(delayS / h0S)));
    h0S = delayS / delayTicks;
  }
  // A feedthrough in both C and P sends each jump round the loop again every T, scaled by
  // |Dc Dp| (echoRatio); strictly proper parts smooth each pass by one derivative.
  const echoes = echoRatio >= 1 ? Infinity : echoRatio > 0 ? Math.log(1e-10) / Math.log(echoRatio) : 0;
  const longStepsFromS = delayS * Math.max(6, echoes);
  // Cut rather than coarsen: a step too long for a live mode gives wrong peaks, a short run only an unknown settling time.
  const { levels, cut } = schedule(ms, h0S, hMaxS, { ticks: delayTicks, longStepsFromS }, durationS, maxSamples);
  const total = levels.reduce((acc, l) => acc + l.steps * l.stride, 0);
  return { h0S, delayTicks, levels, durationS: total * h0S, cut, warnings };
}
