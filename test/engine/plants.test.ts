import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/model/errors.js';
import { newMachine, rejection } from './helpers.js';

/**
 * effectivePlants: what an outer loop controls is its own plant behind its
 * closed inner loop. Closed forms: an integrator inner plant under gain K closes
 * to K/(s + K) (nothing cancelled), so with an outer plant 1/s the outer loop sees
 * K/(s (s + K)) = coefficients num [K], den [0, K, 1] (ascending powers), and the
 * inner loop's bandwidth is K rad/s (first-order low-pass: |T| = 1/sqrt(2) at w = K).
 */
const close = (a: readonly number[], b: readonly number[]) => {
  expect(a.length).toBe(b.length);
  a.forEach((x, i) => expect(x).toBeCloseTo(b[i]!, 9));
};

/** Coefficients scaled so the highest denominator power is 1. */
const monic = (tf: { num: readonly number[]; den: readonly number[] }) => {
  const lead = tf.den[tf.den.length - 1]!;
  return { num: tf.num.map((c) => c / lead), den: tf.den.map((c) => c / lead) };
};

async function cascade() {
  const { m } = newMachine();
  m.addAxis('X');
  await m.addLoop('X/vel', { plant: '1/s' });
  await m.setCompensator('X/vel', ['gain:10']);
  // A heavier load halves the integrator gain: T = 5/(s + 5) with the same compensator.
  await m.setPlant('X/vel', '0.5/s', { variant: 'loaded' });
  await m.addLoop('X/pos', { plant: '1/s', inner: 'X/vel' });
  await m.setRequirements('X/pos', ['pm>=60']);
  return m;
}

describe('effectivePlants', () => {
  it('gives an innermost loop its own plants, state and no inner bandwidth', async () => {
    const m = await cascade();
    const p = await m.effectivePlants('X/vel');
    expect(p).toMatchObject({ loop: 'X/vel', revision: 3, inner: null, innerBandwidthRadS: null, warnings: [] });
    expect(p.variants.map((v) => [v.variant, v.innerVariant])).toEqual([['nominal', null], ['loaded', null]]);
    close(p.variants[1]!.tf.num, [0.5]);
    expect(p.state.compensator.blocks).toEqual([{ kind: 'gain', k: 10 }]);
  });

  it('gives an outer loop the closed inner loop times its own plant, per variant, with the inner bandwidth', async () => {
    const m = await cascade();
    const p = await m.effectivePlants('X/pos');
    expect(p.inner).toBe('X/vel');
    expect(p.state.requirements.map((r) => r.text)).toEqual(['pm>=60']);
    expect(p.variants.map((v) => v.variant)).toEqual(['nominal', 'loaded']);
    for (const [v, K] of [[p.variants[0]!, 10], [p.variants[1]!, 5]] as const) {
      const t = monic(v.tf);
      close(t.num, [K]);
      close(t.den, [0, K, 1]);
      expect(v.innerVariant).toBe(v.variant);
      expect(v.innerBandwidthRadS!).toBeCloseTo(K, 6);
    }
    expect(p.innerBandwidthRadS!).toBeCloseTo(10, 6);
  });

  it('forms the plants of a saved revision or of a draft state, and the inner loop as it is now', async () => {
    const m = await cascade();
    await m.setPlant('X/pos', '2/s');
    const old = await m.effectivePlants('X/pos', { revision: 1 });
    expect(old.revision).toBe(1);
    close(monic(old.variants[0]!.tf).num, [10]);
    const now = await m.effectivePlants('X/pos');
    expect(now.revision).toBe(3);
    close(monic(now.variants[0]!.tf).num, [20]);
    const draft = await m.effectivePlants('X/pos', { state: { ...now.state, plants: { nominal: { text: '3/s', tf: { num: [3], den: [0, 1], delayS: 0 } } } } });
    close(monic(draft.variants[0]!.tf).num, [30]);
    expect((await rejection(m.effectivePlants('X/pos', { revision: 9 })))).toBeInstanceOf(UserError);
  });

  it('says when a delayed inner loop enters as a Pade approximant', async () => {
    const { m } = newMachine();
    m.addAxis('Y');
    await m.addLoop('Y/vel', { plant: '1/s*exp(-0.001*s)' });
    await m.addLoop('Y/pos', { plant: '1/s', inner: 'Y/vel' });
    const p = await m.effectivePlants('Y/pos');
    expect(p.warnings).toHaveLength(1);
    expect(p.warnings[0]).toMatch(/inner loop Y\/vel has a 1ms delay; .*\(3,3\) Pade approximant/);
    // The approximant keeps the DC gain: T_inner(0) = 1, so the outer plant is still an integrator of gain 1.
    const t = p.variants[0]!.tf;
    expect(t.den[0]).toBe(0);
    expect(t.num[0]! / t.den[1]!).toBeCloseTo(1, 12);
  });
});
