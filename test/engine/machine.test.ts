import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { ConflictError, loadMachine, openMachine } from '../../src/engine/index.js';
import { UserError } from '../../src/model/errors.js';
import { newMachine, rejection, steppingClock, tempDir, track } from './helpers.js';

/**
 * Phase margin and crossover of L = wn^2/(s (s + 2 zeta wn)) (unity feedback):
 *   wc = wn sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2),  PM = atan(2 zeta / sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2)).
 * Ogata, Modern Control Engineering, 5th ed., section on phase margin and damping ratio (from memory).
 * With wn^2 = K and 2 zeta wn = 1 this is the plant 1/(s (s + 1)) under a gain K.
 */
function secondOrder(K: number): { pmDeg: number; wcRadS: number } {
  const wn = Math.sqrt(K);
  const z = 1 / (2 * wn);
  const r = Math.sqrt(Math.sqrt(1 + 4 * z ** 4) - 2 * z * z);
  return { pmDeg: (Math.atan((2 * z) / r) * 180) / Math.PI, wcRadS: wn * r };
}

const countRows = (file: string, table: string) => {
  const db = new Database(file, { readonly: true });
  try {
    return db.prepare(`SELECT count(*) FROM ${table}`).pluck().get() as number;
  } finally {
    db.close();
  }
};

describe('revisions', () => {
  it('numbers each change, records author, time, note and parent, and reverts by adding a revision', async () => {
    const { m } = newMachine();
    m.addAxis('X', { note: 'belt axis' });
    await m.addLoop('X/vel', { plant: '1/(s*(s+1))', note: 'first model' });
    await m.setCompensator('X/vel', ['gain:2'], { note: 'start low', author: 'bob' });
    await m.setRequirements('X/vel', ['pm>=45', 'fc>=0.5rad/s']);
    await m.setCompensator('X/vel', ['gain:4']);
    const rev = await m.revert('X/vel', 2, { note: 'back to 2' });
    expect(rev.revision).toMatchObject({ number: 5, parent: 4, kind: 'revert' });
    const log = m.log('X/vel');
    expect(log.map((r) => [r.number, r.parent, r.kind, r.author])).toEqual([
      [1, null, 'create', 'ann'], [2, 1, 'comp', 'bob'], [3, 2, 'spec', 'ann'], [4, 3, 'comp', 'ann'], [5, 4, 'revert', 'ann'],
    ]);
    expect(log[1]!.note).toBe('start low');
    for (const r of log) expect(r.time).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
    expect(new Set(log.map((r) => r.time)).size).toBe(log.length);
    // A revert restores the state of the target exactly, requirements included (there were none at 2).
    expect(m.revision('X/vel', 5).state).toEqual(m.revision('X/vel', 2).state);
    expect(m.revision('X/vel', 4).state.requirements.map((r) => r.text)).toEqual(['pm>=45', 'fc>=0.5rad/s']);
  });

  it('refuses a stale base with who and when, writes nothing, and lands when forced', async () => {
    const { m, file } = newMachine();
    m.addAxis('X');
    await m.addLoop('X/vel', { plant: '1/(s*(s+1))' });
    const other = track(openMachine(file, { author: 'bob', now: steppingClock(Date.UTC(2031, 5, 6)) }));
    const seen = m.loopInfo('X/vel').head.number;
    const v0 = m.dataVersion();
    await other.setCompensator('X/vel', ['gain:3'], { base: seen, note: 'bob tunes' });
    expect(m.dataVersion()).not.toBe(v0);
    const e = await rejection(m.setCompensator('X/vel', ['gain:2'], { base: seen }));
    expect(e).toBeInstanceOf(ConflictError);
    expect(e.message).toContain('revision 2 was saved by bob at 2031-06-06T00:00:01.000Z ("bob tunes")');
    expect(e.message).not.toContain('\n');
    expect(m.log('X/vel').length).toBe(2);
    const forced = await m.setCompensator('X/vel', ['gain:2'], { base: seen, force: true });
    expect(forced.revision).toMatchObject({ number: 3, parent: 1 });
    expect(m.log('X/vel').map((r) => r.author)).toEqual(['ann', 'bob', 'ann']);
    expect((await rejection(m.setCompensator('X/vel', ['gain:2'], { base: 9 }))).message).toMatch(/no revision 9 .* latest is 3/);
  });

  it('writes nothing when a change is refused', async () => {
    const { m, file } = newMachine();
    m.addAxis('X');
    await m.addLoop('X/vel', { plant: '1/(s*(s+1))' });
    const dump = m.dump();
    const results = countRows(file, 'result');
    const refusals = [
      m.setCompensator('X/vel', ['lead:100/10']), // zero above pole
      m.setCompensator('X/vel', ['pid:kp=1,kd=0.1']), // improper without a filter, not marked ideal
      m.setRequirements('X/vel', ['pm>=45', 'pm>=50']),
      m.dropRequirements('X/vel', 'gm'),
      m.dropPlant('X/vel', 'nominal'),
      m.setPlant('X/vel', 's^2/(s+1)'), // improper plant
      m.setPlant('X/nope', '1/s'),
      m.addLoop('X/vel', { plant: '1/s' }),
      m.addLoop('X/pos', { plant: '1/s', inner: 'X/missing' }),
    ];
    for (const p of refusals) expect(await rejection(p)).toBeInstanceOf(UserError);
    expect(m.dump()).toBe(dump);
    expect(countRows(file, 'result')).toBe(results);
  });
});

describe('check', () => {
  it('passes and fails requirements by the closed-form margin, naming variant, value and limit', async () => {
    const { m } = newMachine('rad');
    m.addAxis('X');
    await m.addLoop('X/vel', { plant: '1/(s*(s+1))' });
    const k1 = secondOrder(1);
    const ok = await m.setRequirements('X/vel', [`pm>=${(k1.pmDeg - 1).toFixed(2)}`, `fc>=${(k1.wcRadS * 0.99).toFixed(4)}`]);
    expect(ok.results[0]!.status).toBe('pass');
    const pm = ok.results[0]!.variants[0]!.requirements[0]!;
    expect(pm.value).toBeCloseTo(k1.pmDeg, 6);

    // A heavier variant: 4/(s (s+1)) is the same loop under gain 4, with a smaller margin.
    const r = await m.setPlant('X/vel', '4/(s*(s+1))', { variant: 'loaded' });
    const res = r.results[0]!;
    expect(res.status).toBe('fail');
    expect(res.failures.map((f) => [f.requirement.metric, f.variant])).toEqual([['pm', 'loaded']]);
    expect(res.failures[0]!.value).toBeCloseTo(secondOrder(4).pmDeg, 6);
    expect(res.summary).toMatch(/^fail: phase margin .*deg, needs >= .*deg \(loaded\)$/);
    const report = await m.check();
    expect(report).toMatchObject({ status: 'fail', counts: { pass: 0, fail: 1, unstable: 0, error: 0 }, reanalysed: 0 });

    // The overview shows the worst variant's margin; the detail has every variant's requirement results.
    const [row] = await m.overview();
    expect(row).toMatchObject({ loop: 'X/vel', status: 'fail', variants: ['nominal', 'loaded'] });
    expect(row!.headline.phaseMarginDeg).toBeCloseTo(secondOrder(4).pmDeg, 6);
    expect(row!.headline.crossoverRadS).toBeCloseTo(k1.wcRadS, 6);
    const detail = await m.loopDetail('X/vel');
    expect(detail.result.variants.map((v) => v.requirements.map((q) => q.pass))).toEqual([[true, true], [false, true]]);
    expect(detail.history.length).toBe(3);
    expect(Object.keys(detail.state.plants).sort()).toEqual(['loaded', 'nominal']);
  });

  it('says unstable when a variant\'s closed loop is unstable, and error when it cannot be analysed', async () => {
    const { m } = newMachine('rad');
    m.addAxis('Z');
    // 1/(s - 1) under gain K: closed-loop pole at 1 - K.
    await m.addLoop('Z/lift', { plant: '1/(s-1)' });
    expect((await m.setCompensator('Z/lift', ['gain:0.5'])).results[0]!.status).toBe('unstable');
    const stable = (await m.setCompensator('Z/lift', ['gain:2'])).results[0]!;
    expect(stable.status).toBe('pass');
    expect(stable.variants[0]!.metrics!.closedLoopPoles[0]!.re).toBeCloseTo(-1, 9);
    await m.addLoop('Z/odd', { plant: '1' });
    const err = (await m.setCompensator('Z/odd', ['gain:-1'])).results[0]!; // 1 + L = 0: no closed loop at all
    expect(err.status).toBe('error');
    expect(err.summary).toMatch(/^error: /);
    const report = await m.check();
    expect(report.status).toBe('error');
    expect(report.counts).toEqual({ pass: 1, fail: 0, unstable: 0, error: 1 });
  });

  it('evaluates an unsaved compensator without writing, and diffs two revisions with metric deltas', async () => {
    const { m, file } = newMachine('rad');
    m.addAxis('X');
    await m.addLoop('X/vel', { plant: '1/(s*(s+1))' });
    await m.setCompensator('X/vel', ['gain:4']);
    const rows = countRows(file, 'result');
    const dump = m.dump();
    const w = await m.whatIf('X/vel', { compensator: ['gain:1'] });
    expect(w.loop.variants[0]!.metrics!.phaseMarginDeg).toBeCloseTo(secondOrder(1).pmDeg, 6);
    expect(w.loop.inputHash).toBe('unsaved');
    expect(countRows(file, 'result')).toBe(rows);
    expect(m.dump()).toBe(dump);

    const d = await m.diff('X/vel', 1, 2);
    expect(d.changes).toEqual([{ what: 'compensator', key: null, from: '(unity gain)', to: 'gain:4' }]);
    const dpm = d.metrics.find((x) => x.metric === 'phaseMarginDeg' && x.variant === 'nominal')!;
    expect(dpm.from).toBeCloseTo(secondOrder(1).pmDeg, 6);
    expect(dpm.delta).toBeCloseTo(secondOrder(4).pmDeg - secondOrder(1).pmDeg, 6);
  });
});

describe('dump and load', () => {
  it('round-trips a machine with history byte for byte', async () => {
    const { m } = newMachine('hz', 'gantry 7');
    m.addAxis('X', { note: 'belt, 1.2 m' });
    m.addAxis('spindle');
    await m.addLoop('X/cur', { plant: '2000/(s+400)', sampleRateHz: 16000, note: 'amplifier' });
    await m.setCompensator('X/cur', ['pi:60Hz', 'gain:2']);
    await m.addLoop('X/vel', { plant: '50/s*exp(-0.0001*s)', inner: 'cur' });
    await m.setCompensator('X/vel', ['gain:0.5', 'pi:5Hz', 'notch:420Hz,depth=20dB,q=2', 'lp2:800Hz,zeta=0.7'], { note: 'notch for the belt mode — first try' });
    await m.setPlant('X/vel', '80/s*exp(-0.0001*s)', { variant: 'loaded' });
    await m.setRequirements('X/vel', ['pm>=45', 'gm>=6dB', 'sep>=4']);
    await m.addLoop('spindle/vel', { plant: '30/(s*(s/200+1))' });
    await m.setCompensator('spindle/vel', ['pid:kp=0.5,ki=10,kd=0.001'], { ideal: true });
    await m.setCompensator('spindle/vel', ['expr:(s+10)/(s+100)', 'gain:3']);
    await m.revert('spindle/vel', 2);
    const text = m.dump();
    expect(text).toContain('"filterRadS": "inf"');
    const file2 = path.join(tempDir(), 'copy.db');
    const copy = track(await loadMachine(file2, text, { author: 'cy' }));
    expect(copy.dump()).toBe(text);
    expect(copy.settings()).toMatchObject({ name: 'gantry 7', unit: 'hz' });
    const a = await m.check();
    const b = await copy.check();
    expect(b.loops.map((r) => [r.loop, r.status, r.summary])).toEqual(a.loops.map((r) => [r.loop, r.status, r.summary]));
    expect(b.loops.map((r) => r.inputHash)).toEqual(a.loops.map((r) => r.inputHash));

    // Loading again into a store that holds axes is refused and changes nothing.
    expect((await rejection(loadMachine(file2, text))).message).toMatch(/already holds axes/);
    expect(copy.dump()).toBe(text);
    // A damaged dump is refused with where the problem is.
    const bad = text.replace('"number": 2,', '"number": 7,');
    const nowhere = path.join(tempDir(), 'x.db');
    expect((await rejection(loadMachine(nowhere, bad))).message).toMatch(/^dump: .*revision 2\.number: expected 2/);
    expect(fs.existsSync(nowhere)).toBe(false);
  });
});

describe('headline', () => {
  it('keeps the sign of the gain margin: an unstable loop says the gain must fall', async () => {
    // 1/(s(s+1)(s+2)) is on the stability boundary at K = 6 (Routh; e.g. Ogata, Modern Control
    // Engineering, 5th ed., sec. 5-7, from memory), with the phase crossover at sqrt(2) rad/s.
    // At K = 12 the gain margin is -20 log10(2) dB; at K = 3 it is +20 log10(2) dB.
    const { m } = newMachine('rad');
    m.addAxis('R');
    await m.addLoop('R/pos', { plant: '1/(s*(s+1)*(s+2))' });
    const { headline } = await import('../../src/engine/index.js');
    const high = (await m.setCompensator('R/pos', ['gain:12'])).results[0]!;
    expect(high.status).toBe('unstable');
    expect(headline(high).gainMarginDb).toBeCloseTo(-20 * Math.log10(2), 6);
    const low = (await m.setCompensator('R/pos', ['gain:3'])).results[0]!;
    expect(headline(low).gainMarginDb).toBeCloseTo(20 * Math.log10(2), 6);
  });
});
