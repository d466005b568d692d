import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STATUS_GLYPH } from '../../src/model/requirements.js';
import { ok, storeCli } from './run.js';

/**
 * The demo machine end to end: `demo` builds it, `check` reports it. The truth
 * is fixtures/demo/reference.json, written by scripts/demo_reference.py with
 * numpy 2.4.6 / scipy 1.17.1 from the same fixture (exact frequency responses,
 * inner loops closed exactly; stability and step from [8/8] Pade state space).
 */

interface RefVariant {
  stable: boolean;
  phase_margins_deg: number[];
  gain_margin_db: number | null;
  bandwidth_rad_s: number | null;
  kv: number;
  step: { overshoot_pct: number } | null;
  failures: { requirement: string }[];
}
interface RefLoop { revision: number; status: string; variants: Record<string, RefVariant> }
const HERE = path.dirname(fileURLToPath(import.meta.url));
const REFERENCE: Record<string, RefLoop> = JSON.parse(fs.readFileSync(path.join(HERE, '../../fixtures/demo/reference.json'), 'utf8')).loops;

let dir = '';
let run: ReturnType<typeof storeCli>;
let created = '';
beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(fs.realpathSync(process.env.TMPDIR ?? '/tmp'), 'loopledger-demo-'));
  run = storeCli(path.join(dir, 'demo.loopledger.db'));
  created = ok(await run('demo'));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const rowOf = (out: string, loop: string) => out.split('\n').find((l) => l.startsWith(`${loop} `)) ?? '';

describe('loopledger demo', () => {
  it('builds the machine and says what to run next', () => {
    expect(created).toMatch(/^created .*demo\.loopledger\.db: machine 'edge-finishing cell 7', 5 axes, 12 loops, \d+ revisions$/m);
    expect(created).toContain(`loopledger --store ${path.join(dir, 'demo.loopledger.db')} check`);
  });

  it('reuses an existing store and changes nothing', async () => {
    const before = ok(await run('dump'));
    expect(ok(await run('demo'))).toMatch(/^using the existing store /);
    expect(ok(await run('dump'))).toBe(before);
  });

  it('has the shape the scenario promises: cascades, a notch, variants, several revisions', async () => {
    const loops = JSON.parse(ok(await run('loop', 'list', '--json'))) as { ref: string; inner: string | null; head: { number: number } }[];
    expect(new Set(loops.map((l) => l.ref.split('/')[0])).size).toBeGreaterThanOrEqual(4);
    expect(loops.length).toBeGreaterThanOrEqual(11);
    expect(loops.some((l) => l.ref.endsWith('/pos') && l.inner?.endsWith('/vel'))).toBe(true);
    expect(loops.every((l) => l.head.number >= 3)).toBe(true);
    const zvel = JSON.parse(ok(await run('loop', 'show', 'Z/vel', '--json')));
    expect(Object.keys(zvel.state.plants).sort()).toEqual(['loaded', 'nominal']);
    const xvel = JSON.parse(ok(await run('loop', 'show', 'X/vel', '--json')));
    expect(xvel.state.compensator.blocks.map((b: { kind: string }) => b.kind)).toContain('notch');
    expect(new Set(JSON.parse(ok(await run('log', 'Y/vel', '--json'))).map((r: { author: string }) => r.author)).size).toBeGreaterThan(1);
  });

  it('check agrees with the numpy/scipy reference, loop by loop and variant by variant', async () => {
    const r = await run('check', '--json');
    expect(r.err).toBe('');
    const report = JSON.parse(r.out);
    expect(report.loops.map((l: { loop: string }) => l.loop).sort()).toEqual(Object.keys(REFERENCE).sort());
    for (const loop of report.loops) {
      const ref = REFERENCE[loop.loop]!;
      expect(loop.revision, loop.loop).toBe(ref.revision);
      expect(loop.status, loop.loop).toBe(ref.status);
      expect(loop.variants.map((v: { variant: string }) => v.variant).sort(), loop.loop).toEqual(Object.keys(ref.variants).sort());
      for (const v of loop.variants) {
        const want = ref.variants[v.variant]!;
        const m = v.metrics;
        const where = `${loop.loop} (${v.variant})`;
        expect(m.stable, where).toBe(want.stable);
        expect(Math.min(...m.phase_margins_deg.map(Math.abs)), where).toBeCloseTo(Math.min(...want.phase_margins_deg.map(Math.abs)), 1);
        expect(m.gain_margin_db, where).toBeCloseTo(want.gain_margin_db!, 1);
        expect(m.bandwidth_rad_s / want.bandwidth_rad_s!, where).toBeCloseTo(1, 2);
        if (Number.isFinite(want.kv) && want.kv < 1e6) expect(m.kv / want.kv, where).toBeCloseTo(1, 3);
        if (want.step) expect(m.step.overshoot_pct, where).toBeCloseTo(want.step.overshoot_pct, 0);
        const failed = v.requirements.filter((x: { pass: boolean }) => !x.pass).map((x: { requirement: { text: string } }) => x.requirement.text).sort();
        expect(failed, where).toEqual(want.failures.map((f) => f.requirement).sort());
      }
    }
    // The scenario promises something to show: failing loops and an unstable one (by the reference, not by us).
    const statuses = Object.values(REFERENCE).map((l) => l.status);
    expect(statuses).toContain('fail');
    expect(statuses).toContain('unstable');
    expect(statuses).toContain('pass');
  });

  it('prints a truthful overview: one line per loop, status as word and mark, the worst miss', async () => {
    const r = await run('check');
    expect(r.code).toBe(1);
    expect(r.err).toBe('');
    const report = JSON.parse((await run('--no-color', 'check', '--json')).out);
    const counts = report.counts as Record<string, number>;
    const head = r.out.split('\n')[0]!;
    for (const [k, n] of Object.entries(counts)) if (n > 0) expect(head).toContain(`${n} ${k}`);
    expect(r.out).not.toMatch(/\x1b\[/); // no colour codes: the mark and the word carry the status
    for (const loop of report.loops) {
      const line = rowOf(r.out, loop.loop);
      expect(line, loop.loop).toContain(`${STATUS_GLYPH[loop.status as keyof typeof STATUS_GLYPH]} ${loop.status}`);
      expect(line).toMatch(new RegExp(` ${loop.revision} `));
      if (loop.status === 'fail') {
        // The worst miss names one of the failed requirements, its value and its limit.
        const metrics = loop.failures.map((f: { requirement: { metric: string } }) => f.requirement.metric);
        const shown = /(\w+) \S+ [<>] \S+/.exec(line.slice(line.lastIndexOf('  ')))?.[1];
        expect(metrics, line).toContain(shown);
      }
      if (loop.status === 'unstable') expect(line).toContain('unstable closed loop');
    }
  });

  it('round-trips through dump and load byte for byte', async () => {
    const first = ok(await run('dump'));
    const file = path.join(dir, 'demo.json');
    fs.writeFileSync(file, first);
    const copy = storeCli(path.join(dir, 'copy.db'));
    ok(await copy('load', file));
    expect(ok(await copy('dump'))).toBe(first);
  });

  it('demo --open, not in a terminal, prints the dashboard overview once and exits 0', async () => {
    const out = ok(await run('demo', '--open'));
    expect(out).toMatch(/^edge-finishing cell 7 .*12 loops: /m);
    expect(out).toMatch(/^ +x fail +└ vel .*\(loaded\)$/m);
  });
});
