import { describe, expect, it } from 'vitest';
import { ConflictError, openMachine } from '../../src/engine/index.js';
import { UserError } from '../../src/model/errors.js';
import { newMachine, rejection, steppingClock, track } from './helpers.js';

/**
 * applyEdit: the dashboard's draft (compensator and the whole requirement list)
 * saved as one revision. Plant 1/(s (s + 1)) under gain k: |L(jw)| = 1 at
 * w^2 = (sqrt(1 + 4 k^2) - 1)/2, PM = 90 deg - atan(w) (closed form of the
 * standard second-order loop; Ogata, Modern Control Engineering, 5th ed., sec. 7-7, from memory):
 * k = 1: PM = 51.83 deg; k = 4: PM = 28.02 deg.
 */
const pmDeg = (k: number) => 90 - (Math.atan(Math.sqrt((Math.sqrt(1 + 4 * k * k) - 1) / 2)) * 180) / Math.PI;

async function rig() {
  const { m, file } = newMachine();
  m.addAxis('X');
  await m.addLoop('X/vel', { plant: '1/(s*(s+1))' });
  await m.setCompensator('X/vel', ['gain:4']);
  await m.setRequirements('X/vel', ['pm>=45', 'fc>=0.5rad/s']);
  return { m, file };
}

describe('applyEdit', () => {
  it('writes one revision for a compensator and requirement change, checked like any other', async () => {
    const { m } = await rig();
    const o = await m.applyEdit('X/vel', { compensator: ['gain:1'], requirements: ['pm>=50', 'gm>=6dB'] }, { base: 3, note: 'calmer' });
    expect(o.revision).toMatchObject({ number: 4, parent: 3, kind: 'edit', note: 'calmer', status: 'pass' });
    expect(o.revision.summary).toBe('edit: comp gain:1; spec pm>=50 gm>=6dB');
    expect(m.log('X/vel').map((r) => r.number)).toEqual([1, 2, 3, 4]);
    const s = m.revision('X/vel').state;
    expect(s.compensator.blocks).toEqual([{ kind: 'gain', k: 1 }]);
    // The list replaces the saved one: fc>= is gone.
    expect(s.requirements.map((r) => r.text)).toEqual(['pm>=50', 'gm>=6dB']);
    const pm = o.results[0]!.variants[0]!.requirements.find((r) => r.requirement.metric === 'pm')!;
    expect(pm.value!).toBeCloseTo(pmDeg(1), 6);
  });

  it('names the revision comp or spec when only one of them moved', async () => {
    const { m } = await rig();
    const comp = await m.applyEdit('X/vel', { compensator: ['gain:1'], requirements: ['pm>=45', 'fc>=0.5rad/s'] });
    expect(comp.revision).toMatchObject({ kind: 'comp', summary: 'comp gain:1' });
    const spec = await m.applyEdit('X/vel', { requirements: [] });
    expect(spec.revision).toMatchObject({ kind: 'spec', summary: 'spec cleared' });
    expect(m.revision('X/vel').state.requirements).toEqual([]);
  });

  it('saves what whatIf previewed', async () => {
    const { m } = await rig();
    const edit = { compensator: ['gain:2', 'lead:0.5rad/s/5rad/s'], requirements: ['pm>=40', 'ms<=1.6'] };
    const preview = await m.whatIf('X/vel', edit);
    const saved = await m.applyEdit('X/vel', edit);
    const strip = (r: typeof preview.loop) => ({ status: r.status, summary: r.summary, variants: r.variants });
    expect(strip(saved.results[0]!)).toEqual(strip(preview.loop));
  });

  it('keeps an ideal compensator ideal unless told otherwise, and refuses an improper one that is not', async () => {
    const { m } = await rig();
    await m.setCompensator('X/vel', ['pid:kp=1,kd=0.1'], { ideal: true });
    const kept = await m.applyEdit('X/vel', { compensator: ['pid:kp=1,kd=0.2'] });
    expect(m.revision('X/vel', kept.revision.number).state.compensator.ideal).toBe(true);
    const e = await rejection(m.applyEdit('X/vel', { compensator: ['pid:kp=1,kd=0.3'], ideal: false }));
    expect(e).toBeInstanceOf(UserError);
    expect(e.message).toMatch(/more zeros than poles/);
    expect(m.loopInfo('X/vel').head.number).toBe(kept.revision.number);
  });

  it('refuses a stale base naming who saved since, an unchanged draft, and a metric given twice; writes nothing', async () => {
    const { m, file } = await rig();
    const other = track(openMachine(file, { author: 'bob', now: steppingClock(Date.UTC(2031, 0, 1)) }));
    await other.setCompensator('X/vel', ['gain:3'], { note: 'bob was here' });
    const stale = await rejection(m.applyEdit('X/vel', { compensator: ['gain:1'], requirements: ['pm>=50'] }, { base: 3 }));
    expect(stale).toBeInstanceOf(ConflictError);
    expect(stale.message).toMatch(/revision 4 was saved by bob/);
    const same = await rejection(m.applyEdit('X/vel', { compensator: ['gain:3'], requirements: ['pm>=45', 'fc>=0.5rad/s'] }, { base: 4 }));
    expect(same).toBeInstanceOf(UserError);
    expect(same.message).toMatch(/^nothing to save: the edit equals the latest revision of X\/vel$/);
    const twice = await rejection(m.applyEdit('X/vel', { requirements: ['pm>=45', 'pm>=50'] }));
    expect(twice.message).toMatch(/two requirements for pm>= in one edit/);
    expect(m.loopInfo('X/vel').head.number).toBe(4);
    // Forced over the stale base, it lands on top with the base as its parent.
    const forced = await m.applyEdit('X/vel', { compensator: ['gain:1'] }, { base: 3, force: true });
    expect(forced.revision).toMatchObject({ number: 5, parent: 3, kind: 'comp' });
  });

  it('rechecks the outer loops built on the edited one in the same revision', async () => {
    // Closed forms: an integrator under gain K closes to K/(s + K), bandwidth K rad/s. The outer loop
    // sees K/(s (s + K)) and closes to K/(s^2 + K s + K); its bandwidth solves
    // (K - w^2)^2 + K^2 w^2 = 2 K^2, i.e. w^4 + (K^2 - 2K) w^2 - K^2 = 0.
    const outerBw = (K: number) => Math.sqrt((-(K * K - 2 * K) + Math.sqrt((K * K - 2 * K) ** 2 + 4 * K * K)) / 2);
    const { m } = newMachine();
    m.addAxis('X');
    await m.addLoop('X/vel', { plant: '1/s' });
    await m.addLoop('X/pos', { plant: '1/s', inner: 'X/vel' });
    const before = await m.setRequirements('X/pos', ['sep>=4']);
    const sepOf = (r: (typeof before.results)[number]) => r.variants[0]!.requirements[0]!.value!;
    expect(sepOf(before.results[0]!)).toBeCloseTo(1 / outerBw(1), 9);
    expect(before.results[0]!.status).toBe('fail');
    const o = await m.applyEdit('X/vel', { compensator: ['gain:10'] });
    expect(o.results.map((r) => r.loop)).toEqual(['X/vel', 'X/pos']);
    expect(sepOf(o.results[1]!)).toBeCloseTo(10 / outerBw(10), 9);
    expect(o.results[1]!.status).toBe('pass');
  });
});
