import { describe, expect, it } from 'vitest';
import { analyseLoop } from '../../src/analysis/loop.js';
import { polyMul } from '../../src/analysis/poly.js';
import { compensatorTf } from '../../src/design/blocks-tf.js';
import { designLag } from '../../src/design/lag.js';
import type { DesignOutcome } from '../../src/design/types.js';
import { makeDesignVariant } from '../../src/design/variants.js';
import type { Block } from '../../src/model/blocks.js';
import type { TransferFunction } from '../../src/model/tf.js';

function step(o: DesignOutcome, label: string): number {
  const s = o.worksheet.find((x) => x.label.startsWith(label));
  if (!s || typeof s.value !== 'number') throw new Error(`no numeric step '${label}'`);
  return s.value;
}

const lagOf = (blocks: readonly Block[] | undefined) => blocks?.find((b) => b.kind === 'lag') as Extract<Block, { kind: 'lag' }>;

/** x to n significant figures. */
const sig = (x: number, n: number) => Number(x.toPrecision(n));

describe('lag procedure against textbook worked examples', () => {
  it('Ogata, Modern Control Engineering, 5th ed., Example 7-27 (from memory): G = 1/(s(s+1)(0.5s+1)), Kv = 5, PM >= 40 deg, GM >= 10 dB', () => {
    const plant: TransferFunction = { num: [1], den: polyMul([0, 1], polyMul([1, 1], [1, 0.5])), delayS: 0 };
    // The book adds 12 deg for the lag's own phase and puts the zero at one fifth of the new crossover.
    const o = designLag([makeDesignVariant('nominal', plant)], 0, { pmDeg: 40, allowDeg: 12, zeroRatio: 5, targets: [{ kind: 'kv', value: 5 }], fallbackK: 1 });
    // Book: K = 5; new crossover "about 0.5 rad/s" (one significant figure; 0.465 computed);
    // attenuation "about 20 dB" (19.6 computed) so beta = 10; Gc = 0.5 (s + 0.1)/(s + 0.01): zero 0.1, pole 0.01.
    expect(step(o, 'gain K')).toBeCloseTo(5, 12);
    const w = step(o, 'new crossover');
    expect(sig(w, 1)).toBe(0.5);
    expect(sig(step(o, 'attenuation needed'), 1)).toBe(20);
    const hand = lagOf(o.hand?.blocks);
    expect(hand.zeroRadS).toBeCloseTo(w / 5, 12);
    expect(sig(hand.zeroRadS * (0.5 / w), 1)).toBe(0.1); // the book's zero, from its rounded crossover
    expect(sig(hand.poleRadS, 1)).toBe(0.01);
    // The book's own compensator gives PM about 40 deg and meets its GM >= 10 dB.
    const book = analyseLoop(plant, compensatorTf({ blocks: [{ kind: 'gain', k: 5 }, { kind: 'lag', zeroRadS: 0.1, poleRadS: 0.01 }] }));
    expect(Math.abs(book.phaseMarginDeg! - 40)).toBeLessThan(2); // "about 40", read off a plot
    expect(book.gainMarginDb!).toBeGreaterThan(10);
    // Refined: PM on target within 0.1 deg, Kv still 5, GM still above 10 dB.
    const m = analyseLoop(plant, compensatorTf({ blocks: o.refined!.blocks }));
    expect(m.stable).toBe(true);
    expect(Math.abs(m.phaseMarginDeg! - 40)).toBeLessThan(0.1);
    expect(m.kv).toBeCloseTo(5, 10);
    expect(m.gainMarginDb!).toBeGreaterThan(10);
  });

  it('Nise, Control Systems Engineering, 6th ed., Example 11.2 (from memory): tenfold Kv at 9.5 % overshoot, G = 100K/(s(s+36)(s+100))', () => {
    const plant: TransferFunction = { num: [100], den: polyMul([0, 1], polyMul([36, 1], [100, 1])), delayS: 0 };
    // Example 11.1 gives K = 583.9 for 9.5 % overshoot (PM 59.2 deg); the lag must raise Kv tenfold.
    const kv = (10 * 583.9 * 100) / 3600;
    const o = designLag([makeDesignVariant('nominal', plant)], 0, { pmDeg: 59.2, allowDeg: 10, zeroRatio: 10, targets: [{ kind: 'kv', value: kv }], fallbackK: 1 });
    // Book: K = 5839; phase -110.8 deg at 9.8 rad/s; magnitude there 24 dB; zero a decade below at
    // 0.98 rad/s; Gc = 0.0638 (s + 0.98)/(s + 0.0626). Tolerances: 1 % (three figures), 0.2 dB, and
    // 2.5 % on the pole, which the book took from its plot's 24 dB line.
    expect(step(o, 'gain K')).toBeCloseTo(5839, 8);
    expect(step(o, 'phase wanted')).toBeCloseTo(-110.8, 10);
    expect(Math.abs(step(o, 'new crossover') / 9.8 - 1)).toBeLessThan(0.01);
    expect(Math.abs(step(o, 'attenuation needed') - 24)).toBeLessThan(0.2);
    const hand = lagOf(o.hand?.blocks);
    expect(Math.abs(hand.zeroRadS / 0.98 - 1)).toBeLessThan(0.01);
    expect(Math.abs(hand.poleRadS / 0.0626 - 1)).toBeLessThan(0.025);
    const m = analyseLoop(plant, compensatorTf({ blocks: o.refined!.blocks }));
    expect(m.stable).toBe(true);
    expect(Math.abs(m.phaseMarginDeg! - 59.2)).toBeLessThan(0.1);
    expect(m.kv).toBeCloseTo(kv, 9);
  });
});
