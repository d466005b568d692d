import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { benchDump } from '../../bench/store-bench.js';
import { parseCanonical, prettyJson } from '../../src/engine/canonical-json.js';
import type { MachineDump } from '../../src/engine/dump.js';
import { loadMachine, type Machine } from '../../src/engine/index.js';
import { analysisPool, AnalysisPool, closeAnalysisPool } from '../../src/engine/pool.js';
import { configurePool, defaultWorkers, workerExecArgv } from '../../src/engine/pool-setup.js';
import { runTask, type RecheckTask } from '../../src/engine/pool-task.js';
import { loadEvaluator } from '../../src/engine/recheck.js';
import type { LoopState } from '../../src/engine/types.js';
import { tempDir, track } from './helpers.js';

/**
 * The recheck worker pool must change nothing but the time taken: the same rows
 * in the store, byte for byte, and the same results handed back, as the serial
 * recheck, here run from source (the worker bundled on the fly). The built
 * dist/ worker is exercised in pool-dist.test.ts.
 */

const FIXED = new Date(Date.UTC(2030, 4, 6, 7, 8, 9));

afterEach(() => configurePool({}));
afterAll(() => closeAnalysisPool());

/** The bench machine made less uniform: a variant inside a cascade, a failing loop, a loop that cannot be analysed. */
function variedDump(axes: number): string {
  const d = parseCanonical<MachineDump>(benchDump(axes));
  const loop = (a: number, name: string) => d.axes[a]!.loops.find((l) => l.name === name)!;
  const state = (a: number, name: string) => loop(a, name).revisions[0]!.state as { -readonly [K in keyof LoopState]: LoopState[K] };
  const cur = state(1, 'cur');
  cur.plants = { ...cur.plants, hot: { text: '350/(s+900)*exp(-0.00005*s)', tf: { num: [350], den: [900, 1], delayS: 5e-5 } } };
  const pos = state(2, 'pos');
  pos.requirements = pos.requirements.map((r) => (r.metric === 'pm' ? { ...r, value: 89, text: 'pm>=89' } : r));
  // 1 + L(inf) = 0: no closed loop exists, the loop is an error.
  const tension = state(3, 'tension');
  tension.plants = { nominal: { text: '1', tf: { num: [1], den: [1], delayS: 0 } } };
  tension.compensator = { blocks: [{ kind: 'gain', k: -1 }] };
  return prettyJson(d);
}

function resultRows(file: string): unknown[] {
  const db = new Database(file, { readonly: true });
  try {
    return db.prepare('SELECT loop_id, revision, input_hash, status, result_json, computed_at FROM result ORDER BY loop_id, revision, input_hash').all();
  } finally {
    db.close();
  }
}

async function loadWith(workers: number, dump: string): Promise<{ m: Machine; file: string }> {
  configurePool(workers === 0 ? { workers: 0 } : { workers, minLoops: 1 });
  const file = path.join(tempDir(), `w${workers}.loopledger.db`);
  const m = track(await loadMachine(file, dump, { author: 'ann', now: () => FIXED }));
  return { m, file };
}

describe('recheck on the worker pool', () => {
  it('stores byte-identical result rows and returns equal results to a serial recheck', async () => {
    const dump = variedDump(6);
    const serial = await loadWith(0, dump);
    closeAnalysisPool();
    configurePool({ workers: 2 });
    // Started workers: a cold pool would leave the main thread all of a run this small.
    await analysisPool()!.started();
    const parallel = await loadWith(2, dump);
    // A worker did part of the analysis: agreement is not the main thread alone.
    const shares = { ...analysisPool()!.analysed };
    expect(shares.byWorkers).toBeGreaterThan(0);
    expect(shares.byWorkers + shares.byMain).toBe(24);
    const rows = resultRows(serial.file);
    expect(rows.length).toBe(24);
    expect(resultRows(parallel.file)).toStrictEqual(rows);

    configurePool({ workers: 0 });
    const a = await serial.m.recheckAll();
    configurePool({ workers: 2, minLoops: 1 });
    const b = await parallel.m.recheckAll();
    expect(b).toStrictEqual(a);
    expect(b.reanalysed).toBe(24);
    expect(analysisPool()!.analysed.byWorkers).toBeGreaterThan(shares.byWorkers);
    // The variety is really there, so agreement covers every status and the variant path.
    const status = (ref: string) => a.loops.find((l) => l.loop === ref)!.status;
    expect([status('A002/pos'), status('A003/tension'), status('A000/pos')]).toStrictEqual(['fail', 'error', 'pass']);
    expect(a.loops.find((l) => l.loop === 'A001/pos')!.variants.map((v) => v.variant)).toStrictEqual(['nominal', 'hot']);
  });

  it('rechecks only stale loops through the pool and keeps fresh ones', async () => {
    const { m } = await loadWith(2, variedDump(4));
    const before = await m.check();
    expect(before.reanalysed).toBe(0);
    const change = await m.setCompensator('A000/cur', ['gain:12', 'pi:750rad/s']);
    expect(change.results.map((r) => r.loop)).toStrictEqual(['A000/cur', 'A000/vel', 'A000/pos']);
    configurePool({ workers: 0 });
    const file2 = path.join(tempDir(), 'again.loopledger.db');
    const serial = track(await loadMachine(file2, m.dump(), { author: 'ann', now: () => FIXED }));
    // Same states, checked serially from scratch: the pool's results for the changed loops agree.
    const s = await serial.check(['A000/cur', 'A000/vel', 'A000/pos']);
    expect(s.loops.map((r) => [r.status, r.variants[0]!.metrics?.phaseMarginDeg])).toStrictEqual(change.results.map((r) => [r.status, r.variants[0]!.metrics?.phaseMarginDeg]));
  });
});

/** A small task: one stand-alone loop, as recheck would send it. */
function task(id: number, gain: number): RecheckTask {
  const state: LoopState = {
    plants: { nominal: { text: `${gain}/(s*(s+20))`, tf: { num: [gain], den: [0, 20, 1], delayS: 0 } } },
    requirements: [{ metric: 'pm', op: '>=', value: 45, text: 'pm>=45' }],
    compensator: { blocks: [] },
  };
  return { loops: [{ id, ref: `X/l${id}`, state, innerId: null }], analyse: [{ id, revision: 1, inputHash: `h${id}` }], known: [], computedAt: FIXED.toISOString(), unit: 'rad', json: true };
}

/** A worker module from source text. */
const workerUrl = (body: string) => new URL(`data:text/javascript,${encodeURIComponent(`import { workerData } from 'node:worker_threads';\nconst { port, signal } = workerData;\nconst post = (m) => { port.postMessage(m); Atomics.add(signal, 0, 1); Atomics.notify(signal, 0); };\n${body}`)}`);

describe('the pool when workers fail', () => {
  const tasks = Array.from({ length: 9 }, (_, i) => task(i + 1, 100 * (i + 1)));

  it('gives the same results as the main thread when workers cannot load the analysis', async () => {
    const ev = await loadEvaluator();
    const expected = new Map(tasks.flatMap((t) => runTask(ev, t)).map((c) => [c.id, c]));
    const pool = new AnalysisPool(2, workerUrl(`post({ kind: 'fatal', error: 'no analysis here' });`));
    expect(pool.run(tasks, ev)).toStrictEqual(expected);
    // Once the workers have had time to say so, a run knows they are of no use.
    await pool.started();
    expect(pool.run(tasks, ev)).toStrictEqual(expected);
    expect(pool.broken).toBe(true);
    expect(pool.analysed).toStrictEqual({ byWorkers: 0, byMain: 18 });
  });

  it('runs a batch on the main thread when a worker reports it failed', async () => {
    const ev = await loadEvaluator();
    const expected = new Map(tasks.flatMap((t) => runTask(ev, t)).map((c) => [c.id, c]));
    const pool = new AnalysisPool(2, workerUrl(`port.on('message', (m) => post({ kind: 'failed', run: m.run, batch: m.batch, error: 'boom' }));`));
    try {
      expect(pool.run(tasks, ev)).toStrictEqual(expected);
      expect(pool.broken).toBe(false);
      expect(pool.analysed).toStrictEqual({ byWorkers: 0, byMain: 9 });
    } finally {
      pool.close();
    }
  });

  it('does not wait for workers that are still starting: it takes their batches back', async () => {
    const ev = await loadEvaluator();
    const pool = new AnalysisPool(2, workerUrl(`port.on('message', () => {});`), { stallMs: 60_000 });
    try {
      const t0 = Date.now();
      const out = pool.run(tasks, ev);
      expect([...out.keys()].sort((a, b) => a - b)).toStrictEqual([1, 2, 3, 4, 5, 6, 7, 8, 9]);
      expect(Date.now() - t0).toBeLessThan(30_000); // far below the stall limit: nothing waited for it
      expect(pool.analysed).toStrictEqual({ byWorkers: 0, byMain: 9 });
      expect(pool.broken).toBe(false);
    } finally {
      pool.close();
    }
  });

  it('takes over from workers that started but never answer', async () => {
    const ev = await loadEvaluator();
    const pool = new AnalysisPool(2, workerUrl(`post({ kind: 'ready' });\nimport('node:worker_threads').then((w) => w.parentPort.postMessage('ready'));\nport.on('message', () => {});`), { stallMs: 200 });
    // Both said they are ready, so their batches count as started.
    await pool.started();
    const out = pool.run(tasks.slice(0, 3), ev);
    expect([...out.keys()].sort()).toStrictEqual([1, 2, 3]);
    expect(pool.broken).toBe(true);
  });

  it('survives workers that die while starting: the main thread does the work, the process does not crash', async () => {
    const ev = await loadEvaluator();
    const expected = new Map(tasks.flatMap((t) => runTask(ev, t)).map((c) => [c.id, c]));
    const pool = new AnalysisPool(2, workerUrl(`throw new Error('dies at start');`), { stallMs: 300 });
    expect(pool.run(tasks, ev)).toStrictEqual(expected);
    // The workers' error events arrive: they are handled, not thrown, and the next run knows.
    await pool.started();
    expect(pool.run(tasks, ev)).toStrictEqual(expected);
    expect(pool.broken).toBe(true);
  });

  it('throws what the serial path throws when a task itself is bad', async () => {
    const ev = await loadEvaluator();
    const bad: RecheckTask = { ...task(1, 100), analyse: [{ id: 7, revision: 1, inputHash: 'h7' }] };
    const serialError = (() => { try { runTask(ev, bad); } catch (e) { return (e as Error).message; } return 'no error'; })();
    expect(serialError).toMatch(/loop id 7 was not sent/);
    configurePool({ workers: 2 });
    const pool = analysisPool()!;
    expect(() => pool.run([task(2, 50), bad, task(3, 60)], ev)).toThrow(serialError);
    // The pool is still usable afterwards.
    expect([...pool.run([task(4, 70)], ev).keys()]).toStrictEqual([4]);
  });
});

describe('worker options', () => {
  it('leaves one core to the main thread and one to V8 itself: no workers on 2 cores, at most 3', () => {
    expect([1, 2, 3, 4, 6, 64].map(defaultWorkers)).toStrictEqual([0, 0, 1, 2, 3, 3]);
  });

  it('drops how the main program was started and keeps how threads run', () => {
    expect(workerExecArgv(['--input-type=module', '-e', 'code', '--cpu-prof', '--import', 'tsx', '--max-old-space-size=512', '-r', 'x.cjs', '--require=y.cjs', '--stack-size=900']))
      .toStrictEqual(['--cpu-prof', '--max-old-space-size=512', '--stack-size=900']);
  });
});
