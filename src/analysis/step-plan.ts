import type { Complex } from '../model/tf.js';
import type { Mode } from './step-modes.js';

/**
 * How long and how finely to simulate a step, from the closed-loop modes (step-modes.ts).
 *
 * Each mode contributes a term of size w t^k / k! e^(-sigma t) to y or u. It must be
 * followed until it is far below the settling band (duration), and while it is alive the
 * step must resolve it (|p| h small) so that the cubic pieces stay exact to the error
 * budget below. Weighting by size keeps a nearly cancelled slow pole (a PI zero beside a
 * closed-loop pole) from stretching the run, and a tiny fast pole from shrinking the step.
 *
 * Every loop here is bounded: the grid has at most maxSamples steps and at most
 * MAX_LEVELS step doublings, and a mode whose size is unknown or absurd is capped at
 * MAX_WEIGHT with a warning, so that the base step can never collapse to zero.
 */

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

/** Default cap on the steps of one simulated run (stepMetrics runs at most twice). */
export const STEP_SAMPLE_BUDGET = 20_000;
/** Step doublings at most: 2^MAX_LEVELS spans any ratio of doubles (~2^2100) with room to spare. */
const MAX_LEVELS = 2200;
/** Cap on a mode's size relative to the final value (and the size it is capped to). */
export const MAX_WEIGHT = 1e12;
/** Most doublings of the base step within one delay (the delay line indexes whole base steps). */
const MAX_DELAY_DOUBLINGS = 60;
/** Longest planned run (s): far beyond any sample budget, but finite. */
const MAX_DURATION_S = 1e300;
/** The envelope t^k e^(-sigma t) is bounded by a multiple of e^(-(1 - THETA) sigma t). */
const THETA = 1 / 3;

/** The levels for a base step h0 up to durationS, cut short after maxSteps steps (h0S > 0, all finite). */
function schedule(ms: readonly Weighted[], h0S: number, hMaxS: number, delay: DelayLimits, durationS: number, maxSteps: number): { levels: PlanLevel[]; cut: boolean } {
  const levels: PlanLevel[] = [];
  let tick = 0;
  let stride = 1;
  let left = maxSteps;
  const endTick = durationS / h0S;
  // Each pass either returns or doubles the stride; steps are bounded by maxSteps.
  for (let pass = 0; pass < MAX_LEVELS; pass++) {
    const next = stride * 2;
    let switchS = Infinity;
    if (next * h0S <= hMaxS) {
      // Steps longer than the delay only once its jumps and kinks have faded.
      switchS = delay.ticks > 0 && next > delay.ticks ? delay.longStepsFromS : 0;
      for (const m of ms) {
        // The longer step waits until this mode has decayed enough for it (a NaN waits for ever).
        const e = pieceError(m, next * h0S);
        if (!(e <= ERR)) switchS = Math.max(switchS, m.sigma > 0 ? Math.log(e / ERR) / m.sigma : Infinity);
      }
      if (Number.isNaN(switchS)) switchS = Infinity;
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
  return { levels, cut: true };
}

/** ln k! for small k. */
function logFactorial(k: number): number {
  let s = 0;
  for (let i = 2; i <= k; i++) s += Math.log(i);
  return s;
}

/**
 * One mode as a single decaying exponential for the planner. A term t^k e^(-sigma t) is at
 * most (k / (e THETA sigma))^k e^(-(1 - THETA) sigma t), so repeated poles plan a little
 * longer and finer than a lone pole of the same size.
 */
function weighted(m: Mode, yScale: number, uScale: number): Weighted {
  const sigma0 = -m.p.re - m.spread;
  const mag = Math.hypot(m.p.re, m.p.im) + m.spread;
  const weight = Math.max(m.yAmp / yScale, m.uAmp / uScale);
  if (m.power === 0 || !(sigma0 > 0)) return { mag, sigma: sigma0, weight };
  const k = m.power;
  const factor = Math.exp(k * Math.log(k / (Math.E * THETA * sigma0)) - logFactorial(k));
  return { mag, sigma: (1 - THETA) * sigma0, weight: weight * factor };
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
  const maxSamples = Math.max(10, Math.floor(Number.isFinite(opts.maxSamples) ? opts.maxSamples! : STEP_SAMPLE_BUDGET));
  const ms: Weighted[] = modes.map((m) => weighted(m, yScale, uScale)).filter((m) => Number.isFinite(m.mag) && !Number.isNaN(m.sigma));
  if (ms.some((m) => !(m.weight <= MAX_WEIGHT))) {
    // An unknown (infinite, NaN) or absurd size would shrink the step to nothing: plan as if huge, and say so.
    warnings.push(`step plan: a closed-loop mode's size could not be estimated (repeated or nearly cancelled pole); planned as ${MAX_WEIGHT.toExponential(0)} times the final value, results may be less accurate`);
    for (const m of ms) if (!(m.weight <= MAX_WEIGHT)) m.weight = MAX_WEIGHT;
  }
  let tEnd = 0;
  for (const m of ms) {
    if (m.sigma > 0) tEnd = Math.max(tEnd, Math.min(Math.log(m.weight / TAIL), 40) / m.sigma);
    else if (m.weight > TAIL) tEnd = Math.max(tEnd, 20 / Math.max(m.mag, 1e-12));
  }
  for (const p of openLoopPoles) {
    if (Number.isFinite(p.re) && Number.isFinite(p.im)) ms.push({ mag: Math.hypot(p.re, p.im), sigma: -p.re, weight: 1 });
  }
  const hFineS = Math.min(...ms.map(stepFor));
  if (tEnd === 0) {
    // Nothing in y or u moves after 0+: any span shows it; take one of the loop's own time scale.
    const slowest = Math.min(...ms.filter((m) => m.mag > 0).map((m) => m.mag));
    tEnd = Number.isFinite(hFineS) ? 40 * hFineS : Number.isFinite(slowest) ? 10 / slowest : 1;
  }
  tEnd += 2 * delayS;
  // A mode too slow to bound in doubles gets the longest finite span: the sample budget then cuts the run, with a warning.
  let durationS = Math.min(opts.durationS ?? tEnd, MAX_DURATION_S);
  if (!(durationS > 0)) durationS = 1;
  const hMaxS = durationS / MIN_STEPS;
  let h0S = Math.min(hFineS, hMaxS);
  let delayTicks = 0;
  let tooFine = false;
  if (delayS > 0) {
    // A delay of more than 2^60 base steps cannot be followed at that step: the base step grows, the plan says so.
    const want = Math.max(0, Math.ceil(Math.log2(delayS / h0S)));
    tooFine = want > MAX_DELAY_DOUBLINGS;
    delayTicks = 2 ** Math.min(MAX_DELAY_DOUBLINGS, want);
    h0S = delayS / delayTicks;
  }
  if (tooFine) warnings.push(`step plan: the delay is more than 2^${MAX_DELAY_DOUBLINGS} steps of the fastest mode; simulated with coarser steps, only up to the delay`);
  // A feedthrough in both C and P sends each jump round the loop again every T, scaled by
  // |Dc Dp| (echoRatio); strictly proper parts smooth each pass by one derivative.
  const echoes = echoRatio >= 1 ? Infinity : echoRatio > 0 ? Math.log(1e-10) / Math.log(echoRatio) : 0;
  const longStepsFromS = delayS * Math.max(6, echoes);
  // Cut rather than coarsen: a step too long for a live mode gives wrong peaks, a short run only an unknown settling time.
  const { levels, cut } = schedule(ms, h0S, hMaxS, { ticks: delayTicks, longStepsFromS }, tooFine ? Math.min(durationS, delayS) : durationS, maxSamples);
  const total = levels.reduce((acc, l) => acc + l.steps * l.stride, 0);
  return { h0S, delayTicks, levels, durationS: total * h0S, cut: cut || tooFine, warnings };
}
