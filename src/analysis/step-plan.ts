import type { Complex, Poly, TransferFunction } from '../model/tf.js';
import { polyAdd, polyDerivative, polyEvalComplex, polyMul, polyScale } from './poly.js';

/**
 * How long and how finely to simulate a step, from the closed-loop modes.
 *
 * Each mode p contributes r e^(pt) to y, with r the residue of Y(s)/s at p. It must be
 * followed until |r| e^(Re(p) t) is far below the settling band (duration), and while it
 * is alive the step must resolve it (|p| h small) so that the cubic pieces stay exact to
 * a few parts in 1e5. Weighting by |r| keeps a nearly cancelled slow pole (a PI zero
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
  return poles.map((p) => {
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

/** Simulation plan: step length, number of steps, and the steps per delay (0 without delay). */
export interface StepPlan {
  readonly hS: number;
  readonly steps: number;
  readonly delaySteps: number;
  readonly durationS: number;
  readonly warnings: string[];
}

/** |p| h at or below this keeps the cubic pieces accurate to ~1e-5 of a mode's size. */
const RESOLVE = 0.25;
/** Modes are followed until they fall to this fraction of the final value. */
const TAIL = 1e-4;
/** Fewest steps over the whole run, so that slow responses are drawn smoothly. */
const MIN_STEPS = 400;

/**
 * Duration and step from the closed-loop modes; yScale and uScale are the sizes against which
 * mode amplitudes count; extraRateRadS is a further rate to resolve (open-loop poles that
 * act alone while the delay holds the loop open).
 */
export function planStep(
  modes: readonly Mode[],
  extraRateRadS: number,
  delayS: number,
  yScale: number,
  uScale: number,
  opts: { durationS?: number; maxSamples?: number },
): StepPlan {
  const warnings: string[] = [];
  const maxSamples = Math.max(10, Math.floor(opts.maxSamples ?? 20_000));
  let tEnd = 0;
  let wFast = extraRateRadS;
  for (const { p, yAmp, uAmp } of modes) {
    const mag = Math.hypot(p.re, p.im);
    const weight = Math.max(yAmp / yScale, uAmp / uScale);
    if (!(weight > 1e-9)) continue;
    wFast = Math.max(wFast, mag);
    const sigma = -p.re;
    if (sigma > 0) tEnd = Math.max(tEnd, Math.min(Math.log(Math.max(weight, 1) / TAIL), 40) / sigma);
    else tEnd = Math.max(tEnd, 20 / Math.max(mag, 1e-12));
  }
  if (tEnd === 0) tEnd = wFast > 0 ? 10 / wFast : 1;
  tEnd += 2 * delayS;
  const durationS = opts.durationS ?? tEnd;
  let hS = Math.min(wFast > 0 ? RESOLVE / wFast : Infinity, durationS / MIN_STEPS);
  let delaySteps = 0;
  if (delayS > 0) {
    delaySteps = Math.max(1, Math.ceil(delayS / hS));
    hS = delayS / delaySteps;
  }
  let steps = Math.ceil(durationS / hS);
  if (steps > maxSamples) {
    if (delayS > 0) {
      // The delay must stay a whole number of steps: coarsen down to one step per delay at most.
      delaySteps = Math.max(1, Math.floor((delaySteps * maxSamples) / steps));
      hS = delayS / delaySteps;
      steps = Math.ceil(durationS / hS);
      if (steps > 10 * maxSamples) {
        steps = 10 * maxSamples;
        warnings.push(`step response cut at ${(steps * hS).toPrecision(3)} s: the delay is very short next to the slowest mode`);
      }
    } else {
      steps = maxSamples;
      hS = durationS / steps;
      if (hS * wFast > 4 * RESOLVE) warnings.push('step response: fastest modes are coarsely sampled; peak values may be slightly low');
    }
  }
  return { hS, steps, delaySteps, durationS: steps * hS, warnings };
}
