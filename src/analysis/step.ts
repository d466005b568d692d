import type { StepMetrics } from '../model/metrics.js';
import type { Complex, TransferFunction } from '../model/tf.js';
import { closedLoopDcGain } from './error-constants.js';
import { polyAdd, polyMul, polyTrim } from './poly.js';
import { polyRoots } from './roots.js';
import { traceMetrics, zeroFinalValueMetrics } from './step-metrics.js';
import { loopModes } from './step-modes.js';
import { planStep, type StepPlan } from './step-plan.js';
import { simulateStep, type StepTrace } from './step-sim.js';
import { buildLoopSystem, type LoopSystem } from './step-system.js';

/**
 * Unit-step response of the unity-feedback loop u = C (r - y), y = P e^(-sT) u from
 * zero initial state, and its metrics (DESIGN.md, "Step metrics"). The loop is
 * realised from the pole/zero sections of C and P (state-space.ts), discretised
 * exactly (step-sim.ts) on a grid planned from the closed-loop modes (step-plan.ts);
 * the delay runs through a delay line, never a Pade approximant.
 */

/** Below this damping ratio a closed-loop pole counts as on the imaginary axis. */
const MARGINAL_DAMPING = 1e-6;

/** T(0) of the loop exactly from its trailing coefficients (an integrating loop gives 1). */
function loopDcGain(plant: TransferFunction, comp: TransferFunction): number {
  return closedLoopDcGain({ num: polyMul(comp.num, plant.num), den: polyMul(comp.den, plant.den), delayS: 0 });
}

function isProper(tf: TransferFunction): boolean {
  return polyTrim(tf.num).length <= polyTrim(tf.den).length;
}

/** Closed-loop poles for planning when none are given: exact without delay; with a delay, those of the delay-free loop as an estimate. */
function planningPoles(plant: TransferFunction, comp: TransferFunction): Complex[] {
  return polyRoots(polyAdd(polyMul(comp.den, plant.den), polyMul(comp.num, plant.num)));
}

/**
 * Where to look for modes: the given poles, and with a delay also the delay-free ones. A
 * delay pole list is a finite set of estimates that can miss a slow pole (one beside a
 * cancelled multiple root was seen missing); the delay-free pole is near it for short
 * delays, and a circle around a place with no pole just finds no mode there.
 */
function searchPoles(plant: TransferFunction, comp: TransferFunction, given: readonly Complex[] | undefined): readonly Complex[] {
  if (!given || given.length === 0) return planningPoles(plant, comp);
  return plant.delayS + comp.delayS > 0 ? [...given, ...planningPoles(plant, comp)] : given;
}

/** Extra runs, each EXTEND_BY times longer (4 the first time), while the response has not settled and the budget allows. */
const EXTENSIONS = 4;
const EXTEND_BY = 16;
/** Most runs stepMetrics makes: the planned one and the extensions (each at most the sample budget). */
export const STEP_MAX_RUNS = 1 + EXTENSIONS;

interface Run {
  trace: StepTrace;
  plan: StepPlan;
}

/** Builds the loop system and simulates it on the planned grid. */
function run(sys: LoopSystem, plant: TransferFunction, comp: TransferFunction, poles: readonly Complex[], yF: number, opts: { durationS?: number; maxSamples?: number }): Run {
  const modes = loopModes(plant, comp, poles);
  const yScale = yF !== 0 && Number.isFinite(yF) ? Math.abs(yF) : Math.max(1e-300, ...modes.map((m) => (Number.isFinite(m.yAmp) ? m.yAmp : 0)));
  const uScale = Math.max(1e-300, Math.abs(sys.dur), ...modes.map((m) => (Number.isFinite(m.uAmp) ? m.uAmp : 0)));
  const plan = planStep(modes, sys.delayS > 0 ? sys.openLoopPoles : [], sys.delayS, Math.abs(sys.dud), yScale, uScale, opts);
  return { trace: simulateStep(sys, plan), plan };
}

/** Why a loop cannot be simulated, or null; improper or algebraically singular loops. */
function notSimulable(plant: TransferFunction, comp: TransferFunction): string | null {
  for (const tf of [plant, comp]) {
    if (![...tf.num, ...tf.den, tf.delayS].every(Number.isFinite) || tf.delayS < 0) return 'step metrics need finite coefficients and a finite delay >= 0';
  }
  if (!isProper(comp) || !isProper(plant)) return 'step metrics need a proper loop (the compensator or plant has more zeros than poles)';
  return null;
}

/**
 * Samples of the unit-step response y and the effort u of the loop (empty with a warning when
 * it cannot be simulated). Times are not evenly spaced: the step grows as fast modes die out.
 * y[k], u[k] are the values just after tS[k] (y[0] = y(0+)). closedLoopPoles, when known
 * (with a delay: the refined roots), plan the run better than the delay-free estimate.
 */
export function stepResponse(
  plant: TransferFunction,
  comp: TransferFunction,
  opts: { durationS?: number; maxSamples?: number; closedLoopPoles?: readonly Complex[] } = {},
): { tS: Float64Array; y: Float64Array; u: Float64Array; warnings: string[] } {
  const why = notSimulable(plant, comp);
  const empty = { tS: new Float64Array(0), y: new Float64Array(0), u: new Float64Array(0) };
  if (why) return { ...empty, warnings: [why] };
  let sys: LoopSystem;
  try {
    sys = buildLoopSystem(plant, comp);
  } catch (e) {
    return { ...empty, warnings: [`step response unavailable: ${(e as Error).message}`] };
  }
  const poles = searchPoles(plant, comp, opts.closedLoopPoles);
  let r: Run;
  try {
    r = run(sys, plant, comp, poles, loopDcGain(plant, comp), opts);
  } catch (e) {
    return { ...empty, warnings: [`step response unavailable: ${(e as Error).message}`] };
  }
  const { trace, plan } = r;
  const warnings = plan.cut ? [...plan.warnings, `step response cut at ${plan.durationS.toPrecision(3)} s: too many steps to follow it to the end`] : plan.warnings;
  return { tS: trace.tS, y: trace.yPlus, u: trace.uPlus, warnings };
}

/** The metrics when every value is a finite number (or null where allowed), else null. */
function finiteMetrics(m: StepMetrics): StepMetrics | null {
  return Object.values(m).every((v) => v === null || Number.isFinite(v)) ? m : null;
}

/** What stepMetrics returns: simulatedSteps counts the grid steps of every run (at most STEP_MAX_RUNS sample budgets). */
export interface StepMetricsResult {
  readonly metrics: StepMetrics | null;
  readonly warnings: string[];
  readonly simulatedSteps: number;
}

/** Unit-step metrics of a stable loop; null (with warnings saying why) for unstable, marginal or improper loops. */
export function stepMetrics(
  plant: TransferFunction,
  comp: TransferFunction,
  closedLoopPoles: readonly Complex[],
  stable: boolean,
): StepMetricsResult {
  if (!stable) return { metrics: null, warnings: [], simulatedSteps: 0 };
  if (closedLoopPoles.some((p) => p.re >= -MARGINAL_DAMPING * Math.hypot(p.re, p.im))) {
    return { metrics: null, warnings: ['closed-loop poles on or next to the imaginary axis: no step metrics'], simulatedSteps: 0 };
  }
  const why = notSimulable(plant, comp);
  if (why) return { metrics: null, warnings: [why], simulatedSteps: 0 };
  let sys: LoopSystem;
  try {
    sys = buildLoopSystem(plant, comp);
  } catch (e) {
    return { metrics: null, warnings: [`no step metrics: ${(e as Error).message}`], simulatedSteps: 0 };
  }
  const yF = loopDcGain(plant, comp);
  const poles = searchPoles(plant, comp, closedLoopPoles);
  let first: Run;
  try {
    first = run(sys, plant, comp, poles, yF, {});
  } catch (e) {
    return { metrics: null, warnings: [`no step metrics: ${(e as Error).message}`], simulatedSteps: 0 };
  }
  const trace = first.trace;
  let plan = first.plan;
  let simulatedSteps = trace.tS.length - 1;
  const warnings = [...plan.warnings];
  const done = (m: StepMetrics): StepMetricsResult => {
    const metrics = finiteMetrics(m);
    if (!metrics) warnings.push('step simulation gave non-finite values: no step metrics');
    return { metrics, warnings: [...new Set(warnings)], simulatedSteps };
  };
  if (yF === 0) {
    warnings.push('closed-loop DC gain is zero: overshoot, rise, settling and peak time are not defined');
    return done(zeroFinalValueMetrics(trace));
  }
  let res = traceMetrics(trace, yF);
  // The planned run was too short (modes estimated with a delay, or very large residues): run longer, a bounded number of times.
  for (let i = 0; i < EXTENSIONS && !res.settled && !plan.cut; i++) {
    let longer: Run;
    try {
      longer = run(sys, plant, comp, poles, yF, { durationS: plan.durationS * (i === 0 ? 4 : EXTEND_BY) });
    } catch (e) {
      warnings.push(`longer step run failed: ${(e as Error).message}; settling time unknown`);
      return done({ ...res.metrics, settlingTimeS: null });
    }
    simulatedSteps += longer.trace.tS.length - 1;
    res = traceMetrics(longer.trace, yF);
    warnings.push(...longer.plan.warnings);
    plan = longer.plan;
  }
  if (!res.settled) {
    const why = plan.cut ? 'the run was cut short (too many steps)' : 'not settled by then';
    warnings.push(`step response simulated to ${plan.durationS.toPrecision(3)} s, ${why}: settling time unknown`);
  }
  return done(res.metrics);
}
