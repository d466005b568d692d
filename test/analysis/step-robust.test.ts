import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { LoopMetrics, StepMetrics } from '../../src/model/metrics.js';
import type { Poly, TransferFunction } from '../../src/model/tf.js';
import { analyseLoop } from '../../src/analysis/loop.js';
import { polyMul, polyPow, polyScale, polyScaleVariable, polySub } from '../../src/analysis/poly.js';
import { STEP_SAMPLE_BUDGET } from '../../src/analysis/step-plan.js';
import { STEP_MAX_RUNS, stepMetrics } from '../../src/analysis/step.js';

/**
 * Awkward stable loops through the whole path (analyseLoop, which calls stepMetrics):
 * exact pole-zero cancellations, repeated poles, integrators with cancellation, very
 * lightly damped modes, poles over six decades, biproper C and P, and delays from 1e-6
 * to 10 times the loop's time scale. Every call must return within the step budget
 * (stepMetrics counts its simulated steps), give finite metrics or null with a warning,
 * and agree with the closed form where one exists. Each family also runs at a random
 * frequency scale c (s -> s / c), so times are checked in units of 1/c.
 */

const tf = (num: Poly, den: Poly, delayS = 0): TransferFunction => ({ num, den, delayS });
const unity = tf([1], [1]);
/** Log-uniform double in [lo, hi]. */
const logU = (lo: number, hi: number) => fc.double({ min: Math.log10(lo), max: Math.log10(hi), noNaN: true }).map((e) => 10 ** e);

/** Closed-form values (times in s at scale 1) and how close the simulation must come. */
interface Expected {
  overshootPct?: number;
  riseTimeS?: number;
  settlingTimeS?: number;
  peakTimeS?: number | null;
  peakEffort?: number;
  /** Exact response at scale 1: a reported settling time must sit on the band edge of it. */
  y?: (t: number) => number;
  minOvershootPct?: number;
  /** Nothing reaches y before this time (scale 1): the delay. */
  deadS?: number;
  timeRel?: number;
  overshootAbs?: number;
}

interface Case {
  plant: TransferFunction;
  comp: TransferFunction;
  expect: Expected;
}

/** The loop with s replaced by s / c: frequencies times c, times and delay divided by c. */
function atScale(k: Case, c: number): Case {
  const sc = (t: TransferFunction) => tf(polyScaleVariable(t.num, 1 / c), polyScaleVariable(t.den, 1 / c), t.delayS / c);
  return { plant: sc(k.plant), comp: sc(k.comp), expect: k.expect };
}

/** The t in [0, hi] where the increasing f reaches level, by bisection. */
function levelTime(f: (t: number) => number, level: number, hi: number): number {
  let lo = 0;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (f(mid) >= level) hi = mid; else lo = mid;
  }
  return (lo + hi) / 2;
}

/**
 * A stable factor F(s) to cancel: (s + a)^m or (s^2 + 2 zeta w s + w^2)^m, or 1. An m-fold root
 * of rounded coefficients is only defined to about eps^(1/m), so loops whose response is
 * sensitive to it (light damping) take simple factors only.
 */
const cancelArbUpTo = (maxM: number) => fc.oneof(
  fc.constant<Poly>([1]),
  fc.record({ a: logU(1e-3, 1e3), m: fc.integer({ min: 1, max: maxM }) }).map(({ a, m }) => polyPow([a, 1], m)),
  fc.record({ w: logU(1e-3, 1e3), zeta: logU(1e-3, 1), m: fc.integer({ min: 1, max: Math.min(2, maxM) }) }).map(({ w, zeta, m }) => polyPow([w * w, 2 * zeta * w, 1], m)),
);
const cancelArb = cancelArbUpTo(3);

// Families. Closed forms: first-order step response (rise tau ln 9, settling tau ln 50, no overshoot) and the
// underdamped second-order one (overshoot 100 exp(-pi zeta / sqrt(1 - zeta^2)), peak time pi / wd):
// Ogata, Modern Control Engineering, 5th ed., sec. 5-2 and 5-3 (from memory). The inverse Laplace transform
// of a^k / (s (s + a)^k) is 1 - e^(-at) sum_{j<k} (at)^j / j! (Ogata, 5th ed., sec. 2-3 table, from memory).

/** P = k F / (s F) (or C = k F / F, P = 1 / s): exactly the integrator k / s, closed loop k / (s + k). */
const cancelledIntegrator = fc.record({ k: logU(0.1, 10), f: cancelArb, inComp: fc.boolean() }).map(({ k, f, inComp }): Case => ({
  plant: inComp ? tf([1], [0, 1]) : tf(polyScale(f, k), polyMul([0, 1], f)),
  comp: inComp ? tf(polyScale(f, k), f) : unity,
  expect: { overshootPct: 0, riseTimeS: Math.log(9) / k, settlingTimeS: Math.log(50) / k, peakTimeS: null, peakEffort: inComp ? k : 1 },
}));

const erlang = (a: number, k: number) => (t: number) => {
  let term = 1, sum = 1;
  for (let j = 1; j < k; j++) { term *= (a * t) / j; sum += term; }
  return 1 - Math.exp(-a * t) * sum;
};

/** P = a^k / (g ((s + a)^k - a^k)), C = g: closed loop exactly a^k / (s + a)^k (a k-fold pole), optionally with (s + a) cancelled in P too. */
const repeatedClosedLoop = fc.record({ k: fc.integer({ min: 1, max: 6 }), a: logU(0.1, 10), g: logU(0.1, 10), extra: fc.boolean() }).map(({ k, a, g, extra }): Case => {
  const f: Poly = extra ? [a, 1] : [1];
  const y = erlang(a, k);
  const hi = (k + 60) / a;
  // (s + a)^k - a^k has the root s = 0 exactly: set it, rounding would leave ~1e-16 there.
  const den = polySub(polyPow([a, 1], k), [a ** k]);
  den[0] = 0;
  return {
    plant: tf(polyMul(f, [a ** k / g]), polyMul(f, den)),
    comp: tf([g], [1]),
    expect: { overshootPct: 0, riseTimeS: levelTime(y, 0.9, hi) - levelTime(y, 0.1, hi), settlingTimeS: levelTime(y, 0.98, hi), peakTimeS: null, peakEffort: g },
  };
});

/** P = g / (s + a)^k, C = 1, g below the stability limit sec(pi/k)^k; closed forms for k = 1, 2. */
const repeatedPlant = fc.record({ k: fc.integer({ min: 1, max: 6 }), a: logU(0.1, 10), frac: fc.double({ min: 0.05, max: 0.9, noNaN: true }) }).map(({ k, a, frac }): Case => {
  const g = k <= 2 ? 20 * frac : frac / Math.cos(Math.PI / k) ** k;
  const plant = tf([g * a ** k], polyPow([a, 1], k));
  if (k === 1) {
    const p = a * (1 + g);
    return { plant, comp: unity, expect: { overshootPct: 0, riseTimeS: Math.log(9) / p, settlingTimeS: Math.log(50) / p, peakTimeS: null, peakEffort: 1 } };
  }
  if (k === 2) {
    const wn = a * Math.sqrt(1 + g), zeta = 1 / Math.sqrt(1 + g), wd = wn * Math.sqrt(1 - zeta * zeta);
    return { plant, comp: unity, expect: { overshootPct: 100 * Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta)), peakTimeS: Math.PI / wd, peakEffort: 1 } };
  }
  return { plant, comp: unity, expect: {} };
});

/** P = wn^2 F / (s (s + 2 zeta wn) F), C = 1 with zeta down to 1e-3: closed loop wn^2 / (s^2 + 2 zeta wn s + wn^2). */
const lightlyDamped = fc.record({ zeta: logU(1e-3, 1e-2), wn: logU(0.1, 10), f: cancelArbUpTo(1) }).map(({ zeta, wn, f }): Case => {
  const wd = wn * Math.sqrt(1 - zeta * zeta);
  const y = (t: number) => 1 - Math.exp(-zeta * wn * t) * (Math.cos(wd * t) + ((zeta * wn) / wd) * Math.sin(wd * t));
  const tp = Math.PI / wd;
  return {
    plant: tf(polyScale(f, wn * wn), polyMul([0, 2 * zeta * wn, 1], f)),
    comp: unity,
    expect: { overshootPct: 100 * Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta)), peakTimeS: tp, riseTimeS: levelTime(y, 0.9, tp) - levelTime(y, 0.1, tp), peakEffort: 1, y },
  };
});

/** Three real poles spread over six decades, with a proportional or PI compensator (no closed form). */
const sixDecades = fc.record({ p1: logU(1e-3, 3e-3), p2: logU(0.3, 3), p3: logU(300, 1e3), kc: logU(0.1, 100), pi: fc.boolean() }).map(({ p1, p2, p3, kc, pi }): Case => ({
  plant: tf([1], polyMul(polyMul([1, 1 / p1], [1, 1 / p2]), [1, 1 / p3])),
  comp: pi ? tf([kc * p1, kc], [0, 1]) : tf([kc], [1]),
  expect: {},
}));

/**
 * Biproper C = c (s + a) / (s + p) and P = (s + b) / (s + a): L = c (s + b) / (s + p), so
 * y = yF + (y0 - yF) e^(-lambda t) with y0 = c / (1 + c), yF = c b / (p + c b), lambda = (p + c b) / (1 + c),
 * and u likewise from u0 = c / (1 + c) to c a / (p + c b) (first-order response with feedthrough, partial fractions).
 */
const biproper = fc.record({ c: logU(0.1, 10), a: logU(0.1, 10), b: logU(0.1, 10), p: logU(0.1, 10) }).map(({ c, a, b, p }): Case => {
  const y0 = c / (1 + c), yF = (c * b) / (p + c * b), lam = (p + c * b) / (1 + c);
  const at = (q: number) => (y0 >= q * yF ? 0 : Math.log((yF - y0) / ((1 - q) * yF)) / lam);
  const off = Math.abs(y0 - yF) / yF;
  return {
    plant: tf([b, 1], [a, 1]),
    comp: tf([c * a, c], [p, 1]),
    expect: {
      overshootPct: y0 > yF ? 100 * (y0 / yF - 1) : 0,
      peakTimeS: y0 > yF ? 0 : null,
      riseTimeS: at(0.9) - at(0.1),
      settlingTimeS: off <= 0.02 ? 0 : Math.log(off / 0.02) / lam,
      peakEffort: Math.max(c / (1 + c), (c * a) / (p + c * b)),
      // The exact response (the family is filtered to keep y0 off the levels and band edges where a metric jumps).
      y: (t) => yF + (y0 - yF) * Math.exp(-lam * t),
    },
  };
});

/**
 * Delay T = r tau with r from 1e-6 to 10. Lag: L = K e^(-sT) / (tau s + 1), K < 1 (stable for every T,
 * |L| < 1). On [T, 2T) y = K (1 - e^(-(t - T)/tau)) exactly (nothing has come round the loop yet), so
 * when the 90 % level is reached there, rise = tau ln((1 - 0.1/(1 + K)) / (1 - 0.9/(1 + K))), and the
 * overshoot is at least that of y(2T). Integrator with cancellation: L = k F e^(-sT) / (s F), kT < 1.3
 * (< pi/2): y = k (t - T) on [T, 2T), rise 0.8 / k when kT > 0.9. For r <= 1e-4 the delay-free first-order
 * closed forms hold to well within 1 % (the response moves by O(T) in time).
 */
const delayed = fc.record({ r: logU(1e-6, 10), kind: fc.constantFrom('lag', 'integrator'), gain: fc.double({ min: 0.2, max: 0.9, noNaN: true }), kt: fc.double({ min: 0.05, max: 1.3, noNaN: true }), f: cancelArb }).map(({ r, kind, gain, kt, f }): Case => {
  const tau = 1, T = r * tau;
  if (kind === 'lag') {
    const K = gain;
    const expect: Expected = { deadS: T };
    const yF = K / (1 + K);
    if (-tau * Math.log(1 - 0.9 / (1 + K)) < 0.999 * T) {
      expect.riseTimeS = tau * Math.log((1 - 0.1 / (1 + K)) / (1 - 0.9 / (1 + K)));
      expect.minOvershootPct = 100 * ((K * (1 - Math.exp(-T / tau))) / yF - 1);
    }
    if (r <= 1e-4) Object.assign(expect, { riseTimeS: (tau * Math.log(9)) / (1 + K), settlingTimeS: (tau * Math.log(50)) / (1 + K), timeRel: 1e-2, overshootAbs: 0.1 });
    return { plant: tf([K], [1, tau], T), comp: unity, expect };
  }
  // Integrator: for r <= 1e-4 keep kT small so the delay-free closed form applies.
  const k = r <= 1e-4 ? 1 : kt / T;
  const expect: Expected = { deadS: T };
  if (k * T > 0.91) expect.riseTimeS = 0.8 / k;
  if (r <= 1e-4) Object.assign(expect, { riseTimeS: Math.log(9) / k, settlingTimeS: Math.log(50) / k, timeRel: 1e-2, overshootAbs: 0.1 });
  return { plant: tf(polyScale(f, k), polyMul([0, 1], f), T), comp: unity, expect };
});

/** Relative closeness of a metric (seconds at scale 1, after undoing the scale). */
function closeRel(got: number | null, want: number, rel: number): boolean {
  return got !== null && Math.abs(got - want) <= rel * Math.abs(want) + 1e-9;
}

/** Runs the full path and every assertion; returns the loop result for further checks. */
function checkCase(k0: Case, c: number): LoopMetrics {
  const { plant, comp, expect: e } = atScale(k0, c);
  const r = analyseLoop(plant, comp);
  expect(r.stable).toBe(true);
  // The same call as analyseLoop makes, for its step counter: bounded by the runs it may make, each within the sample budget.
  const direct = stepMetrics(plant, comp, r.closedLoopPoles, r.stable);
  expect(direct.simulatedSteps).toBeLessThanOrEqual(STEP_MAX_RUNS * STEP_SAMPLE_BUDGET);
  expect(direct.metrics).toEqual(r.step);
  if (r.step === null) {
    expect(direct.warnings.length).toBeGreaterThan(0);
    return r;
  }
  const m: StepMetrics = r.step;
  for (const v of Object.values(m)) if (v !== null) expect(Number.isFinite(v)).toBe(true);
  if (m.riseTimeS === null || m.settlingTimeS === null) expect(direct.warnings.length).toBeGreaterThan(0);
  expect(m.finalValue).toBe(r.closedLoopDcGain);
  expect(m.overshootPct).toBeGreaterThanOrEqual(0);
  expect(m.undershootPct).toBeGreaterThanOrEqual(0);
  const rel = e.timeRel ?? 1e-3;
  const t = (v: number | null) => (v === null ? null : v * c);
  if (e.overshootPct !== undefined) expect(Math.abs(m.overshootPct - e.overshootPct)).toBeLessThanOrEqual(e.overshootAbs ?? 0.02);
  if (e.overshootAbs !== undefined && e.overshootPct === undefined) expect(m.overshootPct).toBeLessThanOrEqual(e.overshootAbs);
  if (e.minOvershootPct !== undefined) expect(m.overshootPct).toBeGreaterThanOrEqual(e.minOvershootPct - 0.02);
  if (e.riseTimeS !== undefined) expect(closeRel(t(m.riseTimeS), e.riseTimeS, rel)).toBe(true);
  if (e.settlingTimeS !== undefined && m.settlingTimeS !== null) expect(closeRel(t(m.settlingTimeS), e.settlingTimeS, rel)).toBe(true);
  if (e.settlingTimeS !== undefined && e.y === undefined) expect(m.settlingTimeS).not.toBeNull();
  if (e.y !== undefined && m.settlingTimeS !== null && m.settlingTimeS > 0) expect(Math.abs(Math.abs(e.y(t(m.settlingTimeS)!) / m.finalValue - 1) - 0.02)).toBeLessThan(1e-4);
  if (e.peakTimeS === null) expect(m.peakTimeS).toBeNull();
  else if (e.peakTimeS === 0) expect(m.peakTimeS).toBe(0);
  else if (e.peakTimeS !== undefined) expect(closeRel(t(m.peakTimeS), e.peakTimeS, 1e-3)).toBe(true);
  if (e.peakEffort !== undefined) expect(Math.abs(m.peakEffort / e.peakEffort - 1)).toBeLessThan(1e-3);
  if (e.deadS !== undefined) {
    // y = 0 until the delay has passed: it cannot settle, peak or rise before then.
    if (m.settlingTimeS !== null) expect(m.settlingTimeS * c).toBeGreaterThanOrEqual(e.deadS * (1 - 1e-9));
    if (m.peakTimeS !== null) expect(m.peakTimeS * c).toBeGreaterThanOrEqual(e.deadS * (1 - 1e-9));
  }
  return r;
}

const scaleArb = logU(1e-3, 1e3);

describe('awkward stable loops: the step path returns, stays finite and matches closed forms (fast-check)', () => {
  it('the cancelled loop (s+1)/(s(s+1)) with C = 1 is the first-order loop 1/(s+1) (used to hang)', () => {
    const r = checkCase({ plant: tf([1, 1], [0, 1, 1]), comp: unity, expect: { overshootPct: 0, riseTimeS: Math.log(9), settlingTimeS: Math.log(50), peakTimeS: null, peakEffort: 1 } }, 1);
    expect(r.step!.undershootPct).toBe(0);
  });

  const families: [string, fc.Arbitrary<Case>, number][] = [
    ['integrator with exact stable cancellations (real, repeated, lightly damped, six decades)', cancelledIntegrator, 30],
    ['closed loop with a k-fold pole, k <= 6 (Erlang response)', repeatedClosedLoop, 25],
    ['plant with a k-fold pole (s + a)^k, k <= 6', repeatedPlant, 25],
    ['very lightly damped closed loop (zeta 1e-3 .. 1e-2) with cancellations', lightlyDamped, 15],
    ['poles over six decades', sixDecades, 15],
    ['biproper C and P with a cancellation', biproper.filter((k) => {
      // Off the knife edges where a metric jumps: y0 near 10 %, 90 %, the 2 % band of yF or yF itself (overshoot within the error budget counts as none).
      const y0 = k.expect.y!(0), yF = k.expect.y!(1e9);
      return [0.1, 0.9, 0.98, 1, 1.02].every((q) => Math.abs(y0 / yF - q) > 1e-3);
    }), 25],
    ['delays from 1e-6 to 10 times the time scale, with and without cancellation', delayed, 30],
  ];
  for (const [name, arb, numRuns] of families) {
    it(name, () => {
      fc.assert(fc.property(arb, scaleArb, (k, c) => { checkCase(k, c); }), { numRuns, seed: 4242, endOnFailure: true });
    });
  }
});
