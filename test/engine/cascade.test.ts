import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { closeAndSeries } from '../../src/engine/cascade.js';
import { padeDelay } from '../../src/engine/pade.js';
import { newMachine } from './helpers.js';

interface Ref {
  pade: { delayS: number; order: number; num: number[]; den: number[] }[];
  cascade: {
    inner: { comp: { num: number[]; den: number[] }; plant: { num: number[]; den: number[]; delayS: number } };
    outerPlant: { num: number[]; den: number[] };
    num: number[];
    den: number[];
  };
}
// Computed by scripts/reference/ref_pade.py (numpy 2.4.6, scipy 1.17.1; scipy.interpolate.pade).
const ref = JSON.parse(fs.readFileSync(path.join(__dirname, '../../fixtures/reference/pade.json'), 'utf8')) as Ref;

const close = (a: readonly number[], b: readonly number[], rel = 1e-12) => {
  expect(a.length).toBe(b.length);
  a.forEach((x, i) => expect(Math.abs(x - b[i]!)).toBeLessThanOrEqual(rel * Math.max(Math.abs(b[i]!), 1e-300) + 1e-300));
};

describe('Pade approximant of a delay', () => {
  it('matches the closed forms of orders 1 and 2', () => {
    // (1 - sT/2)/(1 + sT/2) and (1 - sT/2 + (sT)^2/12)/(1 + sT/2 + (sT)^2/12):
    // Franklin, Powell & Emami-Naeini, Feedback Control of Dynamic Systems, section on time delay (from memory).
    const T = 0.004;
    close(padeDelay(T, 1).num, [1, -T / 2]);
    close(padeDelay(T, 1).den, [1, T / 2]);
    close(padeDelay(T, 2).num, [1, -T / 2, (T * T) / 12]);
    close(padeDelay(T, 2).den, [1, T / 2, (T * T) / 12]);
  });

  it('matches scipy.interpolate.pade for orders 1 to 5', () => {
    for (const c of ref.pade) {
      const p = padeDelay(c.delayS, c.order);
      close(p.num, c.num, 1e-9);
      close(p.den, c.den, 1e-9);
    }
  });
});

describe('outer plant from a closed inner loop', () => {
  it('is K/(s (s + K)) for an integrator inner plant under gain K, times an outer 1/s', () => {
    // T_inner = K/(s + K) exactly; nothing cancelled.
    const K = 25;
    const r = closeAndSeries({ num: [K], den: [1], delayS: 0 }, { num: [1], den: [0, 1], delayS: 0 }, { num: [1], den: [0, 1], delayS: 0 });
    expect(r.padeOfS).toBe(0);
    close(r.tf.num, [K]);
    close(r.tf.den, [0, K, 1]);
  });

  it('replaces a delayed inner loop by its (3,3) Pade form, as numpy composes it', () => {
    const c = ref.cascade;
    const r = closeAndSeries({ ...c.inner.comp, delayS: 0 }, c.inner.plant, { ...c.outerPlant, delayS: 0 });
    expect(r.padeOfS).toBe(c.inner.plant.delayS);
    close(r.tf.num, c.num, 1e-9);
    close(r.tf.den, c.den, 1e-9);
  });
});

describe('recheck propagation', () => {
  it('changing an inner loop changes the outer loop\'s stored results; an inner spec change does not', async () => {
    const { m, file } = newMachine('rad');
    m.addAxis('X');
    await m.addLoop('X/vel', { plant: '1/s' });
    await m.setCompensator('X/vel', ['gain:10']);
    const added = await m.addLoop('X/pos', { plant: '1/s', inner: 'X/vel' });
    await m.setCompensator('X/pos', ['gain:4']);
    // Outer closed loop: s (s + K) + k K = s^2 + 10 s + 40 -> poles -5 +- j sqrt(15).
    const before = (await m.check(['X/pos'])).loops[0]!;
    const poles = (r: typeof before) => [...r.variants[0]!.metrics!.closedLoopPoles].sort((a, b) => a.im - b.im);
    close(poles(before).map((p) => p.re), [-5, -5], 1e-9);
    close(poles(before).map((p) => p.im), [-Math.sqrt(15), Math.sqrt(15)], 1e-9);
    expect(added.results.map((r) => r.loop)).toEqual(['X/pos']);

    const rows = () => {
      const db = new Database(file, { readonly: true });
      try {
        return db.prepare("SELECT r.revision, r.input_hash FROM result r JOIN loop l ON l.id = r.loop_id WHERE l.name = 'pos' ORDER BY r.revision, r.computed_at").all();
      } finally {
        db.close();
      }
    };
    const n0 = rows().length;

    // What-if on the inner loop shows the outer loop as it would be, and stores nothing.
    const w = await m.whatIf('X/vel', { compensator: ['gain:40'] });
    expect(w.dependants.map((r) => r.loop)).toEqual(['X/pos']);
    close(poles(w.dependants[0]!).map((p) => p.re).sort((a, b) => a - b), [-20 - Math.sqrt(240), -20 + Math.sqrt(240)], 1e-9);
    expect(rows().length).toBe(n0);

    // Inner requirement change: the outer loop sees the same dynamics, its stored result stays fresh.
    const spec = await m.setRequirements('X/vel', ['pm>=45']);
    expect(spec.results.map((r) => r.loop)).toEqual(['X/vel', 'X/pos']);
    expect(rows().length).toBe(n0);
    expect((await m.check(['X/pos'])).reanalysed).toBe(0);

    // Inner gain 10 -> 40: outer poles now roots of s^2 + 40 s + 160 = -20 +- sqrt(240), both real.
    const change = await m.setCompensator('X/vel', ['gain:40']);
    expect(change.results.map((r) => r.loop)).toEqual(['X/vel', 'X/pos']);
    const after = change.results[1]!;
    expect(after.revision).toBe(before.revision);
    expect(after.inputHash).not.toBe(before.inputHash);
    expect(rows().length).toBe(n0 + 1);
    const re = poles(after).map((p) => p.re).sort((a, b) => a - b);
    close(re, [-20 - Math.sqrt(240), -20 + Math.sqrt(240)], 1e-9);
    // The stored result is what a later check reads, without analysing again.
    const again = await m.check(['X/pos']);
    expect(again.reanalysed).toBe(0);
    expect(again.loops[0]!.inputHash).toBe(after.inputHash);
  });

  it('checks an outer loop for every variant of its inner loop', async () => {
    const { m } = newMachine('rad');
    m.addAxis('Y');
    await m.addLoop('Y/vel', { plant: '1/s' });
    await m.setPlant('Y/vel', '2/s', { variant: 'loaded' });
    await m.setCompensator('Y/vel', ['gain:10']);
    const r = await m.addLoop('Y/pos', { plant: '1/s', inner: 'vel' });
    const out = r.results[0]!;
    expect(out.variants.map((v) => v.variant)).toEqual(['nominal', 'loaded']);
    // Inner gain 10 with plant 2/s: T = 20/(s + 20); outer plant 20/(s (s + 20)), unity gain: s^2 + 20 s + 20.
    const loaded = out.variants[1]!.metrics!.closedLoopPoles.map((p) => p.re).sort((a, b) => a - b);
    close(loaded, [-10 - Math.sqrt(80), -10 + Math.sqrt(80)], 1e-9);
  });
});
