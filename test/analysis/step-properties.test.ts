import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { StepMetrics } from '../../src/model/metrics.js';
import type { Complex, Poly, TransferFunction } from '../../src/model/tf.js';
import { polyAdd, polyMul, polyScale, polyScaleVariable } from '../../src/analysis/poly.js';
import { polyRoots } from '../../src/analysis/roots.js';
import { stepMetrics } from '../../src/analysis/step.js';
import { delayClosedLoopPoles } from '../../src/analysis/stability.js';

/**
 * Invariants of the unit-step response that hold exactly in the mathematics:
 * - time scaling: replacing s by s/c in C and P (and T by T/c) gives y_c(t) = y(c t),
 *   so every time divides by c while overshoot, undershoot and peak effort stay;
 * - moving gain between C and P (C g, P / g) leaves y alone and multiplies u by g.
 */

const tf = (num: Poly, den: Poly, delayS = 0): TransferFunction => ({ num, den, delayS });

/** Closed-loop poles as the product's callers pass them: exact without delay, refined roots with one. */
function poles(plant: TransferFunction, comp: TransferFunction): Complex[] {
  const loop = tf(polyMul(comp.num, plant.num), polyMul(comp.den, plant.den), plant.delayS);
  return loop.delayS > 0 ? delayClosedLoopPoles(loop) : polyRoots(polyAdd(loop.den, loop.num));
}

function metrics(plant: TransferFunction, comp: TransferFunction): StepMetrics | null {
  const ps = poles(plant, comp);
  if (ps.some((p) => p.re > -1e-3 * Math.hypot(p.re, p.im))) return null;
  return stepMetrics(plant, comp, ps, true).metrics;
}

/** A random plant K (s/z + 1) / ((s/a + 1)(s^2/w^2 + 2 zeta s/w + 1)) with an optional integrator, and a PI or lead compensator. */
const loopArb = fc.record({
  k: fc.double({ min: 0.2, max: 20, noNaN: true }),
  a: fc.double({ min: 0.3, max: 30, noNaN: true }),
  w: fc.double({ min: 1, max: 100, noNaN: true }),
  zeta: fc.double({ min: 0.05, max: 1.5, noNaN: true }),
  z: fc.double({ min: 0.5, max: 200, noNaN: true }),
  integrator: fc.boolean(),
  pi: fc.boolean(),
  ti: fc.double({ min: 0.05, max: 5, noNaN: true }),
  delayS: fc.oneof(fc.constant(0), fc.double({ min: 1e-4, max: 0.05, noNaN: true })),
});

type LoopParams = typeof loopArb extends fc.Arbitrary<infer T> ? T : never;

function build(r: LoopParams): [TransferFunction, TransferFunction] {
  let den = polyMul([1, 1 / r.a], [1, (2 * r.zeta) / r.w, 1 / (r.w * r.w)]);
  if (r.integrator) den = polyMul(den, [0, 1]);
  const plant = tf(polyScale([1, 1 / r.z], r.k), den, r.delayS);
  const comp = r.pi ? tf([1, r.ti], [0, r.ti]) : tf([1, 1 / r.a], [1, 1 / (8 * r.a)]);
  return [plant, comp];
}

/** The same loop with s replaced by s / c (frequencies times c, times and delay divided by c). */
function scaled(t: TransferFunction, c: number): TransferFunction {
  return tf(polyScaleVariable(t.num, 1 / c), polyScaleVariable(t.den, 1 / c), t.delayS / c);
}

function closeTime(a: number | null, b: number | null, rel: number): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) + 1e-12;
}

describe('step metrics invariants (fast-check)', () => {
  it('time scaling s -> s/c divides every time by c and keeps the rest', () => {
    fc.assert(
      fc.property(loopArb, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (r, c) => {
        const [plant, comp] = build(r);
        const m = metrics(plant, comp);
        fc.pre(m !== null);
        const ms = metrics(scaled(plant, c), scaled(comp, c))!;
        expect(ms).not.toBeNull();
        expect(Math.abs(ms.overshootPct - m!.overshootPct)).toBeLessThan(0.02);
        expect(Math.abs(ms.undershootPct - m!.undershootPct)).toBeLessThan(0.02);
        expect(closeTime(ms.riseTimeS === null ? null : ms.riseTimeS * c, m!.riseTimeS, 1e-3)).toBe(true);
        expect(closeTime(ms.settlingTimeS === null ? null : ms.settlingTimeS * c, m!.settlingTimeS, 1e-3)).toBe(true);
        if (m!.overshootPct > 0.05) expect(closeTime(ms.peakTimeS! * c, m!.peakTimeS, 1e-3)).toBe(true);
        expect(Math.abs(ms.peakEffort / m!.peakEffort - 1)).toBeLessThan(1e-3);
      }),
      { numRuns: 60, seed: 20260 },
    );
  });

  it('moving gain g from P to C keeps y and multiplies the peak effort by g', () => {
    fc.assert(
      fc.property(loopArb, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (r, g) => {
        const [plant, comp] = build(r);
        const m = metrics(plant, comp);
        fc.pre(m !== null);
        const mg = metrics(tf(polyScale(plant.num, 1 / g), plant.den, plant.delayS), tf(polyScale(comp.num, g), comp.den))!;
        expect(Math.abs(mg.overshootPct - m!.overshootPct)).toBeLessThan(1e-6);
        expect(closeTime(mg.riseTimeS, m!.riseTimeS, 1e-9)).toBe(true);
        expect(closeTime(mg.settlingTimeS, m!.settlingTimeS, 1e-9)).toBe(true);
        expect(Math.abs(mg.peakEffort / (g * m!.peakEffort) - 1)).toBeLessThan(1e-6);
      }),
      { numRuns: 60, seed: 7 },
    );
  });
});
