import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { benchDump } from '../../bench/store-bench.js';
import { tempDir } from './helpers.js';

/**
 * The recheck pool from the bundled build: scripts/build.mjs emits worker.js
 * beside the chunks, and a `load` of 160 loops (above the pool's threshold)
 * runs on worker threads there, storing what the serial path stores.
 */

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
// Inside the project, so the bundle finds better-sqlite3 in node_modules; `.vitest-*` is ignored by git.
const OUT = path.join(ROOT, `.vitest-pool-dist-${process.pid}`);

beforeAll(() => {
  const b = spawnSync(process.execPath, ['scripts/build.mjs', '--outdir', OUT], { cwd: ROOT, encoding: 'utf8' });
  expect(b.status, b.stderr).toBe(0);
});
afterAll(() => fs.rmSync(OUT, { recursive: true, force: true }));

/** `loopledger --store STORE load DUMP` on the build, with a CPU profile per thread in profDir. */
function load(store: string, dump: string, workers: string, profDir: string): void {
  const script = `const { main } = await import(${JSON.stringify(pathToFileURL(path.join(OUT, 'main.js')).href)}); process.exitCode = await main(${JSON.stringify(['--store', store, 'load', dump])});`;
  const r = spawnSync(process.execPath, ['--cpu-prof', '--cpu-prof-dir', profDir, '--input-type=module', '-e', script], {
    cwd: path.dirname(store), encoding: 'utf8', env: { ...process.env, LOOPLEDGER_WORKERS: workers, LOOPLEDGER_STORE: '' },
  });
  expect(r.status, r.stderr).toBe(0);
}

/** Threads (one profile each) that ran the worker entry, and of those, how many analysed loops. */
function workerThreads(profDir: string): { started: number; analysed: number } {
  const texts = fs.readdirSync(profDir).map((f) => fs.readFileSync(path.join(profDir, f), 'utf8')).filter((t) => t.includes('/worker.js"'));
  return { started: texts.length, analysed: texts.filter((t) => t.includes('"functionName":"analyseLoop"')).length };
}

/** Result rows without the time they were computed (two processes, two clocks). */
function rows(store: string): string[] {
  const db = new Database(store, { readonly: true });
  try {
    return db.prepare('SELECT loop_id, revision, input_hash, status, result_json FROM result ORDER BY loop_id, revision, input_hash').all()
      .map((r) => JSON.stringify(r).replace(/\\"computedAt\\":\\"[^\\]*\\",/, ''));
  } finally {
    db.close();
  }
}

describe('recheck pool in the build', () => {
  it('analyses on worker threads and stores the same results as the serial path', () => {
    const dir = tempDir();
    const dump = path.join(dir, 'bench.json');
    fs.writeFileSync(dump, benchDump(40));
    const runs = (['0', '2'] as const).map((w) => {
      const store = path.join(dir, `w${w}.loopledger.db`);
      const prof = path.join(dir, `prof${w}`);
      load(store, dump, w, prof);
      return { store, threads: workerThreads(prof) };
    });
    expect(runs[0]!.threads).toStrictEqual({ started: 0, analysed: 0 });
    expect(runs[1]!.threads.started).toBe(2);
    // The main thread analyses too and takes back batches of workers still starting; a worker did some.
    expect(runs[1]!.threads.analysed).toBeGreaterThan(0);
    const serial = rows(runs[0]!.store);
    expect(serial.length).toBe(160);
    expect(serial[0]).not.toMatch(/computedAt/);
    expect(rows(runs[1]!.store)).toStrictEqual(serial);
  });
});
