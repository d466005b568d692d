import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { cli, ok, storeCli, tempDir } from './run.js';

/**
 * Phase margin of the standard second-order loop L = wn^2/(s (s + 2 zeta wn)):
 * PM = atan(2 zeta / sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2))
 * (Ogata, Modern Control Engineering, 5th ed., sec. 7-7; from memory).
 */
function pmSecondOrderDeg(zeta: number): number {
  return (Math.atan((2 * zeta) / Math.sqrt(Math.sqrt(1 + 4 * zeta ** 4) - 2 * zeta ** 2)) * 180) / Math.PI;
}

// 400/(s (s+20)): wn = 20, zeta = 0.5. With gain 0.5: wn = sqrt(200), zeta = 20/(2 sqrt(200)) = 1/sqrt(2).
const PM_UNITY = pmSecondOrderDeg(0.5); // 51.83 deg
const PM_HALF = pmSecondOrderDeg(Math.SQRT1_2); // 65.53 deg

function newStore(): { run: ReturnType<typeof storeCli>; file: string; dir: string } {
  const dir = tempDir();
  const file = path.join(dir, 'rig.loopledger.db');
  return { run: storeCli(file), file, dir };
}

/** The row of `check` output for one loop. */
const row = (out: string, loop: string) => out.split('\n').find((l) => l.startsWith(`${loop} `)) ?? '';

describe('a session on a small machine', () => {
  it('init, axes and loops, requirements, compensators, history, check exit codes', async () => {
    const { run, file } = newStore();
    expect(ok(await run('init', '--name', 'test rig', '--units', 'rad'))).toContain(`created ${file}: machine 'test rig', frequencies in rad/s`);
    expect(fs.existsSync(file)).toBe(true);

    ok(await run('axis', 'add', 'A', '-m', 'first axis'));
    expect(JSON.parse(ok(await run('axis', 'list', '--json')))).toMatchObject([{ name: 'A', note: 'first axis', loops: [] }]);

    const added = ok(await run('loop', 'add', 'A/pos', '--plant', '400/(s*(s+20))', '--sample-rate', '2kHz', '-m', 'second order', '--author', 'zoe'));
    expect(added).toContain('A/pos: revision 1 saved by zoe');
    expect(row(added.split('\n').slice(1).map((l) => l.trim()).join('\n'), 'A/pos')).toContain('+ pass');

    // No requirement yet: passes. pm>=50 holds (PM 51.8 deg), pm>=55 does not.
    ok(await run('spec', 'A/pos', 'pm>=50', '-m', 'first limit'));
    const passing = await run('check');
    expect(passing.code).toBe(0);
    expect(row(passing.out, 'A/pos')).toMatch(/\+ pass +2 +51\.8deg/);
    const json = JSON.parse(ok(await run('check', '--json')));
    expect(json.status).toBe('pass');
    const m = json.loops[0].variants[0].metrics;
    expect(m.phase_margin_deg).toBeCloseTo(PM_UNITY, 6);
    expect(m.kp).toBe('inf'); // type-1 loop: infinite position constant, written as "inf"
    expect(m.gain_margin_db).toBeNull(); // the phase never reaches -180 deg: no gain margin exists

    ok(await run('spec', 'A/pos', 'pm>=55', '-m', 'tighter'));
    const failing = await run('check', 'A/pos');
    expect(failing.code).toBe(1);
    expect(failing.err).toBe('');
    expect(row(failing.out, 'A/pos')).toMatch(/x fail .* pm 51\.8deg < 55deg$/);

    // Halving the gain gives zeta = 1/sqrt(2) and PM 65.5 deg.
    ok(await run('comp', 'set', 'A/pos', 'gain:0.5', '-m', 'calmer', '--base', '3'));
    const fixed = JSON.parse((await run('check', '--json')).out);
    expect(fixed.status).toBe('pass');
    expect(fixed.loops[0].variants[0].metrics.phase_margin_deg).toBeCloseTo(PM_HALF, 6);

    const log = JSON.parse(ok(await run('log', 'A/pos', '--json')));
    expect(log.map((r: { number: number; kind: string; author: string }) => [r.number, r.kind])).toEqual([[1, 'create'], [2, 'spec'], [3, 'spec'], [4, 'comp']]);
    expect(log[0].author).toBe('zoe');
    expect(log[1].author).toBe(os.userInfo().username);
    const plainLog = ok(await run('log', 'A/pos'));
    expect(plainLog).toContain('comp gain:0.5');
    expect(plainLog).toContain('"calmer"');

    const diff = ok(await run('diff', 'A/pos', '3', '4'));
    expect(diff).toContain('revision 3 (x fail) -> revision 4 (+ pass)');
    expect(diff).toContain('compensator: (unity gain) -> gain:0.5');
    expect(diff).toMatch(/phase margin +51\.8deg +65\.5deg +\+13\.7deg/);
    const diffJson = JSON.parse(ok(await run('diff', 'A/pos', '3', '4', '--json')));
    const pm = diffJson.metrics.find((x: { metric: string }) => x.metric === 'phaseMarginDeg');
    expect(pm.delta).toBeCloseTo(PM_HALF - PM_UNITY, 6);

    const reverted = ok(await run('revert', 'A/pos', '3', '-m', 'the machine hummed at half gain'));
    expect(reverted).toContain('A/pos: revision 5 saved');
    expect((await run('check')).code).toBe(1);

    const list = JSON.parse(ok(await run('loop', 'list', '--json')));
    expect(list).toMatchObject([{ ref: 'A/pos', inner: null, sample_rate_hz: 2000, head: { number: 5, kind: 'revert' } }]);
    expect(ok(await run('loop', 'list'))).toMatch(/A\/pos +- +12570rad\/s +5 /);
  });

  it('plant variants, dropping requirements, cascades, unstable loops', async () => {
    const { run } = newStore();
    ok(await run('init', '--units', 'hz'));
    ok(await run('axis', 'add', 'B'));
    ok(await run('loop', 'add', 'B/vel', '--plant', '50/(s+5)'));
    ok(await run('comp', 'set', 'B/vel', 'gain:20', 'pi:1Hz'));
    ok(await run('loop', 'add', 'B/pos', '--plant', '1/s', '--inner', 'B/vel'));
    ok(await run('comp', 'set', 'B/pos', 'gain:10'));
    ok(await run('plant', 'set', 'B/vel', '25/(s+5)', '--variant', 'loaded', '-m', 'half the torque per unit'));
    const shown = ok(await run('loop', 'show', 'B/pos'));
    expect(shown).toContain('B/pos  (axis B, around B/vel)');
    expect(shown).toMatch(/^metric +nominal +loaded$/m); // the outer loop is checked for the inner loop's variants
    const vel = ok(await run('loop', 'show', 'B/vel'));
    expect(vel).toContain('inside B/pos');
    expect(vel).toContain('plant loaded: 25/(s+5)');
    expect(JSON.parse(ok(await run('loop', 'show', 'B/vel', '--json'))).state.plants).toHaveProperty('loaded');

    ok(await run('spec', 'B/vel', 'pm>=45', 'ms<=2'));
    expect(ok(await run('spec', 'B/vel', '--drop', 'ms'))).toContain('spec dropped ms');
    expect(ok(await run('plant', 'drop', 'B/vel', 'loaded'))).toContain('plant loaded dropped');

    // 1/(s-1) under gain 0.5: closed-loop pole at s = +0.5.
    ok(await run('axis', 'add', 'C'));
    ok(await run('loop', 'add', 'C/u', '--plant', '1/(s-1)'));
    ok(await run('comp', 'set', 'C/u', 'gain:0.5'));
    const r = await run('check');
    expect(r.code).toBe(1);
    expect(row(r.out, 'C/u')).toMatch(/! unstable .*unstable closed loop/);
    expect(row(r.out, 'B/vel')).toContain('+ pass');
    expect(r.out.split('\n')[0]).toMatch(/: 3 loops, 2 pass, 1 unstable$/);
    ok(await run('comp', 'set', 'C/u', 'gain:3')); // pole at s = 1 - 3 = -2
    expect((await run('check', 'C/u')).code).toBe(0);
  });

  it('dump, load into a new store, dump again: the same bytes', async () => {
    const { run, dir } = newStore();
    ok(await run('init', '--name', 'round trip'));
    ok(await run('axis', 'add', 'X', '-m', 'belt'));
    ok(await run('loop', 'add', 'X/vel', '--plant', '0.45/(9.6e-4*s)*exp(-1.9e-4*s)', '--sample-rate', '8kHz'));
    ok(await run('spec', 'X/vel', 'pm>=45', 'fc>=20Hz'));
    ok(await run('comp', 'set', 'X/vel', 'gain:0.4', 'pi:5Hz', 'notch:140Hz,depth=40dB,q=0.7', 'lp1:500Hz'));
    const first = ok(await run('dump'));
    const out = path.join(dir, 'machine.json');
    expect(ok(await run('dump', '-o', out))).toBe(`dump written to ${out}\n`);
    expect(fs.readFileSync(out, 'utf8')).toBe(first);
    const other = storeCli(path.join(dir, 'copy.loopledger.db'));
    expect(ok(await other('load', out))).toContain("machine 'round trip', 1 axes, 1 loops");
    expect(ok(await other('dump'))).toBe(first);
  });

  it('prints usage for help and for each command', async () => {
    const help = ok(await cli('help'));
    for (const c of ['init', 'axis', 'loop', 'plant', 'spec', 'comp', 'check', 'log', 'diff', 'revert', 'dump', 'load', 'demo']) expect(help).toMatch(new RegExp(`^  ${c} `, 'm'));
    for (const args of [['init'], ['axis', 'add'], ['loop', 'add'], ['loop', 'show'], ['plant', 'set'], ['spec'], ['comp', 'set'], ['log'], ['diff'], ['revert'], ['check'], ['dump'], ['load'], ['demo']]) {
      const out = ok(await cli(...args, '--help'));
      expect(out.startsWith(`usage: loopledger `)).toBe(true);
    }
  });
});
