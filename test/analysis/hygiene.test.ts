import { describe, expect, it } from 'vitest';
import { analyseLoop } from '../../src/analysis/loop.js';
import { analyseExpressions } from '../../src/analysis/loop-text.js';
import { metricsToContractJson } from '../../src/analysis/contract-json.js';
import { polyMul } from '../../src/analysis/poly.js';
import { tfEvalJw } from '../../src/analysis/tf.js';
import type { LoopMetrics } from '../../src/model/metrics.js';
import type { TransferFunction } from '../../src/model/tf.js';

// Checks here use definitions directly (|L(jw_c)| = 1, angle L(jw_p) = -180 deg, evaluated by
// plain Horner on the coefficients) and invariances (scaling numerator and denominator together
// changes nothing), so they need no outside table.

const FREQ = { step: false } as const;

/** Every crossover satisfies its definition when L is evaluated directly from the coefficients. */
function expectDefinitionsHold(loop: TransferFunction, m: LoopMetrics): void {
  for (const w of m.gainCrossoversRadS) {
    const [re, im] = tfEvalJw(loop, w);
    expect(Math.hypot(re, im)).toBeCloseTo(1, 9);
  }
  for (const w of m.phaseCrossoversRadS.filter((x) => x > 0 && Number.isFinite(x))) {
    const [re, im] = tfEvalJw(loop, w);
    expect(Math.abs(im) / Math.hypot(re, im)).toBeLessThan(1e-9);
    expect(re).toBeLessThan(0);
  }
}

describe('numerical hygiene', () => {
  // Poles at 0.1, 10, 1e3 and 1e5 rad/s (time-constant form), with a PI: an integrator and a zero at 0.5 rad/s.
  const plant: TransferFunction = { num: [1], den: [[1, 10], [1, 0.1], [1, 1e-3], [1, 1e-5]].reduce((p, f) => polyMul(p, f), [1]), delayS: 0 };
  const comp: TransferFunction = { num: [30, 60], den: [0, 1], delayS: 0 };

  it('poles from 0.1 to 1e5 rad/s: crossovers meet their definitions', () => {
    const m = analyseLoop(plant, comp, FREQ);
    const loop: TransferFunction = { num: [30, 60], den: [0, ...plant.den], delayS: 0 };
    expect(m.gainCrossoversRadS.length).toBeGreaterThan(0);
    expect(m.phaseCrossoversRadS.length).toBeGreaterThan(0);
    expectDefinitionsHold(loop, m);
  });

  it('multiplying numerator and denominator by 1e-15 or 1e15 changes no metric', () => {
    const base = analyseLoop(plant, comp, FREQ);
    for (const k of [1e-15, 1e15]) {
      const scaled = analyseLoop({ num: plant.num.map((c) => c * k), den: plant.den.map((c) => c * k), delayS: 0 }, comp, FREQ);
      base.gainCrossoversRadS.forEach((w, i) => expect(scaled.gainCrossoversRadS[i]! / w).toBeCloseTo(1, 10));
      expect(scaled.phaseMarginDeg!).toBeCloseTo(base.phaseMarginDeg!, 8);
      expect(scaled.gainMarginDb!).toBeCloseTo(base.gainMarginDb!, 8);
      expect(scaled.peakSensitivity / base.peakSensitivity).toBeCloseTo(1, 9);
    }
  });

  it('a plant written with coefficients from 1e-15 to 1e15 (poles at 1e-5 and 1e5 rad/s) gives the same margins as its time-constant form', () => {
    const a = analyseExpressions('1e10/((s+1e-5)*(s+1e5))', '1e-5*(1+1/s)', {});
    const b = analyseExpressions('1e10/(1e-5*1e5*(1e5*s+1)*(s/1e5+1))', '1e-5*(1+1/s)', {});
    expect(a.gainCrossoversRadS.length).toBe(b.gainCrossoversRadS.length);
    a.gainCrossoversRadS.forEach((w, i) => expect(b.gainCrossoversRadS[i]! / w).toBeCloseTo(1, 10));
    expect(b.phaseMarginDeg!).toBeCloseTo(a.phaseMarginDeg!, 8);
    expect(b.stable).toBe(a.stable);
  });

  it('order 40: 0.5/(s+1)^40 has its phase crossover at tan(pi/40) and GM = 6.02 dB - 800 log10 cos(pi/40)', () => {
    const m = analyseExpressions('0.5/(s+1)^40', '1', FREQ);
    expect(m.phaseCrossoversRadS[0]! / Math.tan(Math.PI / 40)).toBeCloseTo(1, 9);
    expect(m.gainMarginDb!).toBeCloseTo(20 * Math.log10(2) - 800 * Math.log10(Math.cos(Math.PI / 40)), 8);
    expect(m.stable).toBe(true);
  });

  it('ill-posed and marginal loops warn and never produce NaN', () => {
    const cases: [string, string][] = [['-1', '1'], ['1/s^2', '1'], ['1/(s^2+1)', '1'], ['(s-1)/(s+1)', '-1'], ['0', '1'], ['exp(-0.1*s)', '2'], ['1/(s+1)^30', '1e9']];
    for (const [p, c] of cases) {
      const m = analyseExpressions(p, c, FREQ);
      const text = JSON.stringify(metricsToContractJson(m));
      expect(text, `${p} | ${c}`).not.toMatch(/NaN/);
      if (!m.stable) expect(m.warnings.length + (m.closedLoopPoles.some((q) => q.re > 0) ? 1 : 0), `${p} | ${c}`).toBeGreaterThan(0);
    }
  });
});
