import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyseLoop } from '../../src/analysis/loop.js';
import { polyMul } from '../../src/analysis/poly.js';
import { compensatorTf } from '../../src/design/blocks-tf.js';
import { designLeadBode, type LeadSettings } from '../../src/design/lead.js';
import { makeDesignVariant } from '../../src/design/variants.js';
import type { TransferFunction } from '../../src/model/tf.js';

/** 1/(s^type · prod (s/p + 1)): a type-1 or type-2 plant with real poles. */
function plantOf(type: number, poles: readonly number[]): TransferFunction {
  let den: number[] = type === 1 ? [0, 1] : [0, 0, 1];
  for (const p of poles) den = polyMul(den, [1, 1 / p]);
  return { num: [1], den, delayS: 0 };
}

const settings = (pmDeg: number, target: LeadSettings['targets'][number], stages: number | null = null): LeadSettings => ({
  pmDeg, allowDeg: 5, maxStagePhaseDeg: 60, stages, targets: [target], fallbackK: 1,
});

describe('refined lead: properties on random plants', () => {
  it('order 2-6, one stage enough: the refined lead meets the target PM within 0.1 deg and Kv exactly', () => {
    let designed = 0;
    let runs = 0;
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 5 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.integer({ min: 30, max: 60 }),
        (u, f, pm) => {
          runs++;
          // A motor-like plant: one pole at 10 rad/s, up to four more 10-1000 times higher (order 2-6);
          // Kv puts the uncompensated crossover from about 1.5 to 4 times the first pole.
          const poles = [10, ...u.slice(1).map((x) => 10 * 10 ** (1 + 2 * x))];
          const plant = plantOf(1, poles);
          const kv = 10 * 10 ** (0.4 + 0.8 * f);
          const o = designLeadBode([makeDesignVariant('p', plant)], 0, settings(pm, { kind: 'kv', value: kv }));
          // Only cases where one stage can add the phase (the refinement settled on one stage).
          const stages = o.worksheet.filter((s) => s.label === 'stages').map((s) => s.value);
          fc.pre(stages.length === 2 && stages[1] === 1);
          designed++;
          expect(o.feasible).toBe(true);
          const m = analyseLoop(plant, compensatorTf({ blocks: o.refined!.blocks }));
          expect(m.stable).toBe(true);
          expect(Math.abs(m.phaseMarginDeg! - pm)).toBeLessThan(0.1);
          expect(m.kv / kv).toBeCloseTo(1, 12);
        },
      ),
      { numRuns: 60, seed: 20260512 },
    );
    // The property must have been exercised, not filtered away.
    expect(designed).toBeGreaterThan(runs / 3);
  });

  it('targets one stage cannot reach (60 deg per stage) are met with several stages', () => {
    let checked = 0;
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 3 }),
        fc.double({ min: 0.5, max: 4, noNaN: true }),
        fc.integer({ min: 45, max: 60 }),
        (u, ka, pm) => {
          // A rigid body (type 2) with poles 30-300 rad/s: almost no phase margin before the lead.
          const poles = u.map((x) => 30 * 10 ** x);
          const plant = plantOf(2, poles);
          const variants = [makeDesignVariant('p', plant)];
          const one = designLeadBode(variants, 0, settings(pm, { kind: 'ka', value: ka }, 1));
          fc.pre(!one.feasible); // only targets that one stage cannot reach
          const many = designLeadBode(variants, 0, settings(pm, { kind: 'ka', value: ka }));
          const n = many.worksheet.filter((s) => s.label === 'stages').map((s) => s.value as number);
          expect(Math.max(...n)).toBeGreaterThan(1);
          expect(many.feasible).toBe(true);
          const m = analyseLoop(plant, compensatorTf({ blocks: many.refined!.blocks }));
          expect(m.stable).toBe(true);
          expect(Math.abs(m.phaseMarginDeg! - pm)).toBeLessThan(0.1);
          expect(m.ka / ka).toBeCloseTo(1, 12);
          checked++;
        },
      ),
      { numRuns: 60, seed: 4242 },
    );
    expect(checked).toBeGreaterThan(30);
  });
});
