import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { StepMetrics } from '../../src/model/metrics.js';
import { stepMetrics } from '../../src/analysis/step.js';

/**
 * Step metrics against fixtures/reference/step-cases.json, computed by
 * scripts/reference/step_reference.py with numpy 2.4.6 / scipy 1.17.1 (partial fractions
 * for delay-free loops, the method of steps with solve_ivp for delayed ones).
 * Tolerances of the project: step times within 1 %, overshoot within 0.2 percentage points.
 */

interface RefCase {
  name: string;
  plant: { num: number[]; den: number[]; delay_s: number };
  comp: { num: number[]; den: number[] };
  closed_loop_poles: { re: number; im: number }[];
  step: {
    overshoot_pct: number;
    undershoot_pct: number;
    rise_time_s: number | null;
    settling_time_s: number | null;
    peak_time_s: number | null;
    final_value: number;
    peak_effort: number;
  };
}

const file = JSON.parse(readFileSync(new URL('../../fixtures/reference/step-cases.json', import.meta.url), 'utf8')) as {
  libraries: Record<string, string>;
  cases: RefCase[];
};

/** Times agree within 1 % (plus a hair absolute, for times that are 0 in exact arithmetic). */
function expectTime(got: number | null, want: number | null, scaleS: number): void {
  if (want === null) {
    expect(got).toBeNull();
    return;
  }
  expect(got).not.toBeNull();
  expect(Math.abs(got! - want)).toBeLessThanOrEqual(0.01 * Math.abs(want) + 1e-9 * scaleS);
}

describe('step metrics against the scipy reference table', () => {
  it('names the library versions it was computed with', () => {
    expect(file.libraries).toEqual({ numpy: '2.4.6', scipy: '1.17.1' });
    expect(file.cases.length).toBeGreaterThanOrEqual(10);
  });

  for (const c of file.cases) {
    it(c.name, () => {
      const plant = { num: c.plant.num, den: c.plant.den, delayS: c.plant.delay_s };
      const comp = { num: c.comp.num, den: c.comp.den, delayS: 0 };
      const { metrics, warnings } = stepMetrics(plant, comp, c.closed_loop_poles, true);
      expect(warnings).toEqual([]);
      const m = metrics as StepMetrics;
      const want = c.step;
      const scaleS = want.settling_time_s ?? 1;
      expect(m.finalValue).toBeCloseTo(want.final_value, 12);
      expect(Math.abs(m.overshootPct - want.overshoot_pct)).toBeLessThanOrEqual(0.2);
      expect(Math.abs(m.undershootPct - want.undershoot_pct)).toBeLessThanOrEqual(0.2);
      expectTime(m.riseTimeS, want.rise_time_s, scaleS);
      expectTime(m.settlingTimeS, want.settling_time_s, scaleS);
      expectTime(m.peakTimeS, want.peak_time_s, scaleS);
      expect(Math.abs(m.peakEffort - want.peak_effort)).toBeLessThanOrEqual(1e-3 * want.peak_effort);
    });
  }
});
