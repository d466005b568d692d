import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { initMachine, openMachine } from '../../src/engine/index.js';
import { EngineSource } from '../../src/tui/engine-source.js';
import { resampleLog } from '../../src/tui/resample.js';

/**
 * The dashboard's source on a real store. Plant 1/(s(s+1)) under gain k has, in
 * closed form, |L(jw)| = 1 at w^2 = (sqrt(1 + 4k^2) - 1)/2 and PM = 90 deg - atan(w):
 * k = 1: w = 0.78615 rad/s, PM = 51.83 deg; k = 4: w = 1.8790 rad/s, PM = 28.02 deg.
 */
const crossover = (k: number) => Math.sqrt((Math.sqrt(1 + 4 * k * k) - 1) / 2);
const pm = (k: number) => 90 - (Math.atan(crossover(k)) * 180) / Math.PI;

let dir: string;
let file: string;
let sources: EngineSource[] = [];
const open = (author = 'ana') => {
  const s = new EngineSource(openMachine(file, { author }), author);
  sources.push(s);
  return s;
};

beforeEach(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'll-dash-'));
  file = path.join(dir, 'm.db');
  const m = initMachine(file, { name: 'rig', unit: 'rad' }, { author: 'ana' });
  m.addAxis('X');
  for (const [name, k] of [['pos', 1], ['fast', 4]] as const) {
    await m.addLoop(`X/${name}`, { plant: '1/(s*(s+1))' });
    await m.setCompensator(`X/${name}`, [`gain:${k}`], { note: `gain ${k}` });
    await m.setRequirements(`X/${name}`, ['pm>=45'], { note: 'spec' });
  }
  m.close();
});

afterEach(() => {
  for (const s of sources) s.close();
  sources = [];
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('engine source', () => {
  it('gives the overview with statuses, true margins and the first missed requirement', async () => {
    const o = await open().overview();
    expect(o.machine).toBe('rig');
    expect(o.unit).toBe('rad');
    const pos = o.rows.find((r) => r.id === 'X/pos')!;
    const fast = o.rows.find((r) => r.id === 'X/fast')!;
    expect(pos.status).toBe('pass');
    expect(pos.headline.pmDeg).toBeCloseTo(pm(1), 1);
    expect(pos.headline.crossoverRadS).toBeCloseTo(crossover(1), 3);
    expect(fast.status).toBe('fail');
    expect(fast.worstMiss).toMatchObject({ metric: 'pm', op: '>=', limit: 45, more: 0 });
    expect(fast.worstMiss!.value).toBeCloseTo(pm(4), 1);
    expect(o.lastChange).toMatchObject({ loopId: 'X/fast', revision: 3, author: 'ana', note: 'spec' });
  });

  it('gives a loop with its checks, history newest first, and a Bode curve through 0 dB at the crossover', async () => {
    const d = await open().loop('X/fast');
    expect(d.revision).toBe(3);
    expect(d.history.map((r) => r.revision)).toEqual([3, 2, 1]);
    expect(d.history[0]!.status).toBe('fail');
    // Each revision with the status it was saved with: gain 4 passed until pm>=45 (PM 28 deg) came in.
    expect(d.history.map((r) => [r.revision, r.kind, r.status])).toEqual([[3, 'spec', 'fail'], [2, 'comp', 'pass'], [1, 'create', 'pass']]);
    expect(d.checks).toEqual([expect.objectContaining({ metric: 'pm', pass: false })]);
    expect(d.blocks).toEqual([{ kind: 'gain', k: 4 }]);
    const b = d.bode[0]!;
    expect(b.crossoversRadS[0]).toBeCloseTo(crossover(4), 3);
    const [atWc] = resampleLog(b.wRadS, b.magDb, [crossover(4)]);
    expect(Math.abs(atWc!)).toBeLessThan(0.05);
    // Phase of 1/(s(s+1)) at the crossover: -90 - atan(w) = PM - 180.
    const [phase] = resampleLog(b.wRadS, b.phaseDeg, [crossover(4)]);
    expect(phase!).toBeCloseTo(pm(4) - 180, 0);
    expect(d.step[0]!.finalValue).toBeCloseTo(1, 9);
  });

  it('recomputes a draft without writing, and reports text it cannot read', async () => {
    const src = open();
    const before = (await src.loop('X/fast')).revision;
    const r = await src.whatIf('X/fast', { unit: 'rad', blocks: ['gain:1'], requirements: ['pm>=45'] });
    expect(r.ok && r.status).toBe('pass');
    expect(r.ok && r.variants[0]!.headline.pmDeg).toBeCloseTo(pm(1), 1);
    const bad = await src.whatIf('X/fast', { unit: 'rad', blocks: ['gain:'], requirements: [] });
    expect(bad.ok).toBe(false);
    expect(!bad.ok && bad.error).toMatch(/gain/);
    expect((await src.loop('X/fast')).revision).toBe(before);
  });

  it('saves a draft as one revision based on the one it was read from; a stale base is a conflict', async () => {
    const a = open('ana');
    const b = open('bo');
    const vb = b.dataVersion();
    const saved = await a.save('X/fast', { unit: 'rad', blocks: ['gain:1'], requirements: ['pm>=50', 'gm>=6dB'] }, 3, 'less gain, tighter spec');
    // A compensator change and a requirement change together: one revision of kind 'edit'.
    expect(saved).toEqual({ ok: true, revision: 4 });
    expect(b.dataVersion()).not.toBe(vb);
    const d = await b.loop('X/fast');
    expect(d.blocks).toEqual([{ kind: 'gain', k: 1 }]);
    expect(d.requirements.map((r) => r.text).sort()).toEqual(['gm>=6dB', 'pm>=50']);
    // Gain 1: PM 51.8 deg >= 50, and the phase of 1/(s(s+1)) never reaches -180 deg (no finite gain margin).
    expect(d.history.slice(0, 2).map((r) => [r.revision, r.kind, r.status])).toEqual([[4, 'edit', 'pass'], [3, 'spec', 'fail']]);
    expect(d.note).toBe('less gain, tighter spec');
    const stale = await b.save('X/fast', { unit: 'rad', blocks: ['gain:2'], requirements: ['pm>=50', 'gm>=6dB'] }, 3, 'from an old screen');
    expect(stale).toMatchObject({ ok: false, conflict: true });
    expect(!stale.ok && stale.message).toMatch(/revision 4 was saved by ana/);
    expect((await b.loop('X/fast')).revision).toBe(4);
    const same = await b.save('X/fast', { unit: 'rad', blocks: ['gain:1'], requirements: ['pm>=50', 'gm>=6dB'] }, 4, 'nothing');
    expect(same).toMatchObject({ ok: false, conflict: false });
    expect(!same.ok && same.message).toMatch(/nothing to save/);
    expect((await b.loop('X/fast')).revision).toBe(4);
  });

  it('compares two revisions: what changed and what it did to the phase margin', async () => {
    const src = open();
    await src.save('X/fast', { unit: 'rad', blocks: ['gain:1'], requirements: ['pm>=45'] }, 3, 'less gain');
    const c = await src.compare('X/fast', 3, 4);
    expect(c.changes).toEqual([{ what: 'compensator', key: null, from: 'gain:4', to: 'gain:1' }]);
    const d = c.deltas.find((x) => x.metric === 'phaseMarginDeg')!;
    expect(d.from).toBeCloseTo(pm(4), 1);
    expect(d.to).toBeCloseTo(pm(1), 1);
    expect(c.bodeA[0]!.crossoversRadS[0]).toBeCloseTo(crossover(4), 3);
    expect(c.bodeB[0]!.crossoversRadS[0]).toBeCloseTo(crossover(1), 3);
  });

  it('runs the design assistant and saves a proposal that meets the spec with its worksheet in the note', async () => {
    const src = open();
    expect(src.tuneMethods().map((m) => m.key)).toContain('lead');
    const p = await src.propose('X/fast', 'lead');
    expect(p.ok).toBe(true);
    if (!p.ok) return;
    expect(p.baseRevision).toBe(3);
    expect(p.worksheet.length).toBeGreaterThan(3);
    expect(p.meets).toBe(true);
    const r = await src.applyProposal('X/fast', p, p.baseRevision, 'lead for margin');
    expect(r).toEqual({ ok: true, revision: 4 });
    const d = await src.loop('X/fast');
    expect(d.status).toBe('pass');
    expect(d.note).toMatch(/^lead for margin\n\ntune lead: /);
    // The proposal was read from revision 3: applying it again is refused.
    expect(await src.applyProposal('X/fast', p, p.baseRevision, 'again')).toMatchObject({ ok: false, conflict: true });
  });
});
