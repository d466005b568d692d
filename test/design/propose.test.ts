import { describe, expect, it } from 'vitest';
import { parseTransferFunction } from '../../src/analysis/parse.js';
import { polyMul } from '../../src/analysis/poly.js';
import { compensatorTf } from '../../src/design/blocks-tf.js';
import { compensatorExpr } from '../../src/design/comp-expr.js';
import { propose } from '../../src/design/propose.js';
import type { Block } from '../../src/model/blocks.js';
import { UserError } from '../../src/model/errors.js';
import type { Requirement } from '../../src/model/requirements.js';
import type { Poly, TransferFunction } from '../../src/model/tf.js';

const req = (metric: Requirement['metric'], op: Requirement['op'], value: number): Requirement => ({ metric, op, value, text: `${metric}${op}${value}` });

/** Coefficients divided by the leading denominator coefficient, for comparing two forms of one transfer function. */
function normalised(tf: TransferFunction): { num: Poly; den: Poly } {
  const lead = tf.den[tf.den.length - 1]!;
  return { num: tf.num.map((c) => c / lead), den: tf.den.map((c) => c / lead) };
}

describe('compensator expression', () => {
  it('reads back through the expression parser to the same transfer function, for every block kind', () => {
    const blocks: Block[] = [
      { kind: 'gain', k: -2.5 },
      { kind: 'integrator' },
      { kind: 'pi', zeroRadS: 31.4 },
      { kind: 'lead', zeroRadS: 4.41, poleRadS: 18.4 },
      { kind: 'lag', zeroRadS: 0.1, poleRadS: 0.01 },
      { kind: 'pid', kp: 1.2, ki: 40, kd: 0.002, filterRadS: 5000 },
      { kind: 'notch', centerRadS: 880, depthDb: 26, q: 2 },
      { kind: 'lowpass1', cornerRadS: 3000 },
      { kind: 'lowpass2', cornerRadS: 2500, zeta: 0.7 },
      { kind: 'expr', text: '(s+3)/(s+30)', tf: { num: [3, 1], den: [30, 1], delayS: 0 } },
    ];
    for (const b of blocks) {
      const want = normalised(compensatorTf({ blocks: [b] }));
      const got = normalised(parseTransferFunction(compensatorExpr([b]), 'compensator'));
      expect(got.num.length).toBe(want.num.length);
      expect(got.den.length).toBe(want.den.length);
      got.num.forEach((c, i) => expect(c / want.num[i]!).toBeCloseTo(1, 9));
      got.den.forEach((c, i) => (want.den[i] === 0 ? expect(c).toBe(0) : expect(c / want.den[i]!).toBeCloseTo(1, 9)));
    }
    const all = normalised(parseTransferFunction(compensatorExpr(blocks), 'compensator'));
    const whole = normalised(compensatorTf({ blocks }));
    expect(all.den.length).toBe(whole.den.length);
    all.num.forEach((c, i) => expect(c / whole.num[i]!).toBeCloseTo(1, 8));
  });
});

describe('propose', () => {
  const rigid: TransferFunction = { num: [4], den: [0, 2, 1], delayS: 0 };

  it('judges the stated targets and the loop requirements on every variant, and says which it misses', () => {
    // The same plant twice, the second with three times the gain (a heavier or stronger variant).
    const plants = [{ name: 'light', tf: rigid }, { name: 'strong', tf: { ...rigid, num: [12] } }];
    const p = propose('lead', plants, [], [req('pm', '>=', 50), req('kv', '>=', 20)], {});
    expect(p.perVariant.map((v) => v.variant)).toEqual(['light', 'strong']);
    for (const v of p.perVariant) expect(v.outcomes.map((o) => o.requirement.metric)).toEqual(['pm', 'kv']);
    // Kv holds on both (the strong one has three times as much); the margin is refined on the worst.
    const pms = p.perVariant.map((v) => v.metrics!.phaseMarginDeg!);
    expect(Math.min(...pms)).toBeGreaterThanOrEqual(50);
    expect(Math.abs(Math.min(...pms) - 50)).toBeLessThan(0.1);
    expect(p.ok).toBe(true);
  });

  it('never calls an unstable loop a success: a PI placed below a sharp resonance leaves it unstable', () => {
    const wr = 200;
    const plant: TransferFunction = { num: [wr * wr], den: polyMul([0, 1], [wr * wr, 2 * 0.005 * wr, 1]), delayS: 0 };
    const p = propose('pid', [{ name: 'n', tf: plant }], [], [], { pmDeg: 50, fcRadS: 20 });
    expect(p.blocks.length).toBeGreaterThan(0);
    expect(p.perVariant[0]!.metrics!.stable).toBe(false);
    expect(p.ok).toBe(false);
    expect(p.message).toContain('UNSTABLE');
  });

  it('keeps integral action and filters, replaces gains and dynamic blocks; notch replaces old notches', () => {
    const existing: Block[] = [
      { kind: 'gain', k: 3 },
      { kind: 'pi', zeroRadS: 1 },
      { kind: 'lead', zeroRadS: 2, poleRadS: 20 },
      { kind: 'notch', centerRadS: 500, depthDb: 20, q: 1 },
    ];
    const lead = propose('lead', [{ name: 'n', tf: rigid }], existing, [req('pm', '>=', 40)], {});
    expect(lead.kept.map((b) => b.kind)).toEqual(['pi', 'notch']);
    expect(lead.replaced.map((b) => b.kind)).toEqual(['gain', 'lead']);
    const pid = propose('pid', [{ name: 'n', tf: rigid }], existing, [req('pm', '>=', 40)], { fcRadS: 5 });
    expect(pid.kept.map((b) => b.kind)).toEqual(['notch']);
    const notch = propose('notch', [{ name: 'n', tf: rigid }], existing, [], {});
    expect(notch.replaced.map((b) => b.kind)).toEqual(['notch']);
  });

  it('refuses missing targets and out-of-range options with one clear line', () => {
    expect(() => propose('lead', [{ name: 'n', tf: rigid }], [], [], {})).toThrow(/give --pm DEG or add a requirement pm>=DEG/);
    // No --fc, no fc requirement and no present crossover (|P| < 1 everywhere): nowhere to place a PID.
    const small: TransferFunction = { num: [0.1], den: [1, 1], delayS: 0 };
    expect(() => propose('pid', [{ name: 'n', tf: small }], [], [req('pm', '>=', 45)], {})).toThrow(/--fc/);
    expect(() => propose('lead', [{ name: 'n', tf: rigid }], [], [], { pmDeg: 120 })).toThrow(UserError);
    expect(() => propose('lead', [{ name: 'n', tf: rigid }], [], [], { pmDeg: 45, stages: 0 })).toThrow(/--stages/);
    expect(() => propose('lead', [{ name: 'n', tf: rigid }], [], [], { pmDeg: 45, designVariant: 'hot' })).toThrow(/no plant variant 'hot'.*n/);
  });
});

describe('propose on several plant variants', () => {
  it('reads the hand procedure off the variant that is worst today, so its lead is a real lead', () => {
    // One plant at two loop gains, K/(s(s+2)) with K = 4 and K = 40. For K/(s(s+a)) the crossover is
    // w_c^2 = (sqrt(a^4 + 4K^2) - a^2)/2 and PM = 90 - atan(w_c/a) (closed form, e.g. Ogata, Modern
    // Control Engineering, 5th ed., sec. 7-7; from memory): 51.8 deg and 18 deg. The second is the worst.
    const empty: TransferFunction = { num: [4], den: [0, 2, 1], delayS: 0 };
    const heavy: TransferFunction = { num: [40], den: [0, 2, 1], delayS: 0 };
    const pmOf = (k: number, a: number) => {
      const wc = Math.sqrt((Math.sqrt(a ** 4 + 4 * k * k) - a * a) / 2);
      return 90 - (Math.atan(wc / a) * 180) / Math.PI;
    };
    expect(pmOf(40, 2)).toBeLessThan(pmOf(4, 2));
    const p = propose('lead', [{ name: 'empty', tf: empty }, { name: 'stiff-gain', tf: heavy }], [], [req('pm', '>=', 45)], {});
    expect(p.worksheet.some((w) => /on variant stiff-gain/.test(w.label))).toBe(true);
    const lead = p.hand!.blocks.find((b) => b.kind === 'lead');
    expect(lead).toBeDefined();
    if (lead?.kind === 'lead') expect(lead.zeroRadS).toBeLessThan(lead.poleRadS);
    expect(p.ok).toBe(true);
  });
});
