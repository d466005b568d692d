import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ok, refused, storeCli, tempDir } from './run.js';

/**
 * L = 400/(s (s + 20)) under gain g: wn^2 = 400 g, 2 zeta wn = 20. At g = 1, zeta = 0.5 and
 * PM = 51.8 deg; at g = 4, zeta = 0.25 and PM = 28.0 deg (PM = atan(2 zeta / sqrt(sqrt(1 + 4 zeta^4)
 * - 2 zeta^2)); Ogata, Modern Control Engineering, 5th ed., sec. 7-7, from memory).
 * Type 1: Kv = 400 g / 20 = 20 g, so the ramp error 1/Kv is 0.05 at g = 1.
 */
async function store() {
  const run = storeCli(path.join(tempDir(), 'rig.loopledger.db'));
  ok(await run('init', '--name', 'rig', '--units', 'rad'));
  ok(await run('axis', 'add', 'A'));
  ok(await run('loop', 'add', 'A/pos', '--plant', '400/(s*(s+20))'));
  return run;
}

describe('log shows the status each revision was saved with', () => {
  it('in the plain table and in --json', async () => {
    const run = await store();
    ok(await run('spec', 'A/pos', 'pm>=45', '-m', 'margin first'));
    ok(await run('comp', 'set', 'A/pos', 'gain:4', '-m', 'too stiff'));
    const rows = ok(await run('log', 'A/pos')).split('\n');
    expect(rows[0]).toMatch(/^rev +time \(UTC\) +by +status then +change$/);
    const cells = (n: number) => rows.find((l) => l.startsWith(`  ${n} `) || l.startsWith(`${n} `))!;
    expect(cells(1)).toMatch(/ \+ pass +create: plant nominal 400\/\(s\*\(s\+20\)\)$/);
    expect(cells(2)).toMatch(/ \+ pass +spec pm>=45$/);
    expect(cells(3)).toMatch(/ x fail +comp gain:4$/);
    const json = JSON.parse(ok(await run('log', 'A/pos', '--json')));
    expect(json.map((r: { number: number; status: string }) => [r.number, r.status])).toEqual([[1, 'pass'], [2, 'pass'], [3, 'fail']]);
  });
});

describe('spec --drop of a steady-state error', () => {
  it('drops the kp, kv or ka limit that estep, eramp or eparab set', async () => {
    const run = await store();
    ok(await run('spec', 'A/pos', 'estep<=1%', 'eramp<=0.04', 'eparab<=0.1', 'pm>=45'));
    const reqs = async () => JSON.parse(ok(await run('loop', 'show', 'A/pos', '--json'))).state.requirements.map((r: { metric: string; op: string }) => `${r.metric}${r.op}`);
    expect(await reqs()).toEqual(['kp>=', 'kv>=', 'ka>=', 'pm>=']);
    // eramp<=0.04 needs Kv >= 25; the loop has Kv = 20.
    expect((await run('check')).code).toBe(1);
    ok(await run('spec', 'A/pos', '--drop', 'eramp'));
    expect(await reqs()).toEqual(['kp>=', 'ka>=', 'pm>=']);
    ok(await run('spec', 'A/pos', '--drop', 'ESTEP<='));
    ok(await run('spec', 'A/pos', '--drop', 'eparab'));
    expect(await reqs()).toEqual(['pm>=']);
    expect((await run('check')).code).toBe(0);
    expect(refused(await run('spec', 'A/pos', '--drop', 'eramp'))).toMatch(/A\/pos has no requirement 'eramp' to drop; it has: pm>=/);
  });
});
