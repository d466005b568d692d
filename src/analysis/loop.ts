import { UserError } from '../model/errors.js';
import type { LoopMetrics } from '../model/metrics.js';
import type { Complex, TransferFunction } from '../model/tf.js';
import { gainCrossoversRadS, phaseCrossoversRadS } from './crossovers.js';
import { closedLoopDcGain, errorConstants } from './error-constants.js';
import { factorTf, factoredAt, type Factored } from './factors.js';
import { frequencyRangeRadS, loopGridRadS } from './freq.js';
import { sampleLoop, type LoopSamples } from './loop-samples.js';
import { delayMarginS, gainMarginsDb, lowerGainMarginDb, phaseMarginsDeg, reportedMargin, upperGainMarginDb } from './margins.js';
import { polyIsZero } from './poly.js';
import { polyRoots } from './roots.js';
import { bandwidthRadS, peakComplementary, peakSensitivity } from './sensitivity.js';
import { loopStability } from './stability-verdict.js';
import { stepMetrics } from './step.js';
import { tfIsProper, tfSeries, tfValueAtInfinity } from './tf.js';

/**
 * Every metric of the one-loop calculator contract for L = C·P (DESIGN.md).
 * Roots are found once per factor (plant and compensator separately, which is
 * cheaper and better conditioned than the product) and shared by every step.
 */

/** With a delay there are infinitely many phase crossovers: list those with |L| >= this (GM <= 60 dB). */
const DELAY_LIST_MIN_MAG = 1e-3;
const DELAY_LIST_MAX = 200;

/** Frequency samples of the loop, refined where the phase turns fast (and, with a delay, only where |L| is not negligible). */
function loopSamples(f: Factored, knownCrossoversRadS: readonly number[]): LoopSamples {
  const [lo, hi0] = frequencyRangeRadS(f, knownCrossoversRadS);
  let hi = hi0;
  if (f.delayS > 0 && f.poles.length > f.zeros.length) {
    // Reach the frequency above which |L| stays below the listing threshold (it falls monotonically up there).
    const v = new Float64Array(4);
    for (let i = 0; i < 30 && Math.exp(factoredAt(f, hi, v)[0]!) >= DELAY_LIST_MIN_MAG / 2; i++) hi *= 4;
  }
  const base = loopGridRadS(f, lo, hi);
  const lnSmall = Math.log(DELAY_LIST_MIN_MAG / 2);
  return sampleLoop(f, base, (_wa, la, pa, _wb, lb, pb) => Math.abs(pb - pa) > Math.PI / 6 && (f.delayS === 0 || Math.max(la, lb) >= lnSmall));
}

/** Finite phase crossovers, plus 0 where L(0) < 0 and Infinity where L(inf) < 0 (delay-free); the delay listing rule applied. */
function allPhaseCrossovers(loop: TransferFunction, f: Factored, s: LoopSamples, l0: number, lInf: number, warnings: string[]): number[] {
  let finite = phaseCrossoversRadS(loop, f, s);
  if (f.delayS > 0) {
    const v = new Float64Array(4);
    finite = finite.filter((w) => Math.exp(factoredAt(f, w, v)[0]!) >= DELAY_LIST_MIN_MAG);
    if (f.poles.length === f.zeros.length && Math.abs(f.gain) >= DELAY_LIST_MIN_MAG && finite.length > 0) {
      warnings.push(`delay with |L(inf)| > 0: phase crossovers never end; listed up to ${finite[finite.length - 1]!.toPrecision(4)} rad/s`);
    }
    if (finite.length > DELAY_LIST_MAX) {
      warnings.push(`delay: only the first ${DELAY_LIST_MAX} phase crossovers (up to ${finite[DELAY_LIST_MAX - 1]!.toPrecision(4)} rad/s) are listed`);
      finite = finite.slice(0, DELAY_LIST_MAX);
    }
  }
  const out: number[] = [];
  if (Number.isFinite(l0) && l0 < 0) out.push(0);
  out.push(...finite);
  if (f.delayS === 0 && Number.isFinite(lInf) && lInf < 0) out.push(Infinity);
  return out;
}

/** Roots of both factors' numerators (none for a zero numerator) and denominators. */
function loopRoots(plant: TransferFunction, comp: TransferFunction): { zeros: Complex[]; poles: Complex[] } {
  const zeroNum = polyIsZero(plant.num) || polyIsZero(comp.num);
  return {
    zeros: zeroNum ? [] : [...polyRoots(plant.num), ...polyRoots(comp.num)],
    poles: [...polyRoots(plant.den), ...polyRoots(comp.den)],
  };
}

/** Poles and zeros must lie where double precision can still resolve a loop (rad/s). */
const ROOT_RANGE_RAD_S: readonly [number, number] = [1e-15, 1e15];

/** Refuses roots outside ROOT_RANGE_RAD_S (a numerical integrator should be written as s). */
function checkRootRange(rs: readonly Complex[]): void {
  for (const r of rs) {
    const m = Math.hypot(r.re, r.im);
    if (m !== 0 && (m < ROOT_RANGE_RAD_S[0] || m > ROOT_RANGE_RAD_S[1] || !Number.isFinite(m))) {
      throw new UserError(`model has a pole or zero at ${m.toExponential(2)} rad/s, outside ${ROOT_RANGE_RAD_S[0]}..${ROOT_RANGE_RAD_S[1]} rad/s; rescale it (s in rad/s, time in s)`);
    }
  }
}

/** Refuses loops that cannot be analysed as given (one clear line each). */
function checkInputs(plant: TransferFunction, comp: TransferFunction, ideal: boolean): void {
  if (polyIsZero(plant.den)) throw new UserError('plant: the denominator is zero');
  if (polyIsZero(comp.den)) throw new UserError('compensator: the denominator is zero');
  if (!tfIsProper(plant)) throw new UserError('plant: improper model (more zeros than poles); a physical plant has at least as many poles as zeros');
  if (!ideal && !tfIsProper(comp)) throw new UserError('compensator: improper (more zeros than poles); add a derivative filter pole, or mark it ideal (calc: --ideal)');
  for (const tf of [plant, comp]) {
    if (![...tf.num, ...tf.den, tf.delayS].every(Number.isFinite) || tf.delayS < 0) throw new UserError('model coefficients and delay must be finite numbers (delay >= 0)');
  }
}

/** Options of analyseLoop. */
export interface AnalyseOptions {
  /** Admit an improper compensator (step metrics then say why they are missing). */
  readonly ideal?: boolean;
  /** Simulate the step response (default true); false leaves `step` null, for frequency-domain work only. */
  readonly step?: boolean;
}

/** Full contract metrics of the unity-feedback loop C·P. */
export function analyseLoop(plant: TransferFunction, comp: TransferFunction, opts: AnalyseOptions = {}): LoopMetrics {
  checkInputs(plant, comp, opts.ideal === true);
  const warnings: string[] = [];
  const loop = tfSeries(comp, plant);
  const { zeros, poles } = loopRoots(plant, comp);
  checkRootRange([...zeros, ...poles]);
  const f = factorTf(loop, zeros, poles);
  const ec = errorConstants(loop);
  const l0 = ec.kp;
  const lInf = tfValueAtInfinity(loop);

  const gc0 = gainCrossoversRadS(loop, f, null);
  const samples = loopSamples(f, gc0);
  if (samples.truncated) warnings.push('frequency grid budget reached: peaks and crossovers at high frequency may be missed');
  const gcs = gainCrossoversRadS(loop, f, samples, gc0);
  const pms = phaseMarginsDeg(f, gcs);
  const pcs = allPhaseCrossovers(loop, f, samples, l0, lInf, warnings);
  const gms = gainMarginsDb(f, pcs, l0, lInf);
  const pm = reportedMargin(pms, gcs);
  const gm = reportedMargin(gms, pcs);

  const stab = loopStability(loop, f, gcs);
  warnings.push(...stab.warnings);
  const ms = peakSensitivity(f, samples, l0, lInf);
  const mt = peakComplementary(f, samples, l0, lInf);
  const t0 = closedLoopDcGain(loop);

  let step: LoopMetrics['step'] = null;
  if (opts.step !== false) {
    try {
      const r = stepMetrics(plant, comp, stab.poles, stab.stable);
      step = r.metrics;
      warnings.push(...r.warnings);
    } catch (e) {
      warnings.push(`step metrics unavailable: ${e instanceof Error ? e.message : String(e)}`);
    }
  }

  return {
    stable: stab.stable,
    closedLoopPoles: stab.poles,
    closedLoopDcGain: t0,
    systemType: ec.systemType,
    kp: ec.kp,
    kv: ec.kv,
    ka: ec.ka,
    gainCrossoversRadS: gcs,
    phaseMarginsDeg: pms,
    phaseMarginDeg: pm.value,
    phaseMarginAtRadS: pm.atRadS,
    phaseCrossoversRadS: pcs,
    gainMarginsDb: gms,
    gainMarginDb: gm.value,
    gainMarginAtRadS: gm.atRadS,
    gainMarginUpperDb: upperGainMarginDb(gms),
    gainMarginLowerDb: lowerGainMarginDb(gms),
    delayMarginS: delayMarginS(stab.stable, gcs, pms, Math.abs(lInf)),
    peakSensitivity: ms.value,
    peakSensitivityAtRadS: ms.atRadS,
    peakComplementary: mt.value,
    bandwidthRadS: bandwidthRadS(f, samples, t0),
    step,
    warnings,
  };
}
