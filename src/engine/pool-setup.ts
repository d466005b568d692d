import fs from 'node:fs';
import { createRequire } from 'node:module';
import os from 'node:os';
import { fileURLToPath } from 'node:url';

/**
 * How many recheck workers to use, from when on, and where their code is.
 * LOOPLEDGER_WORKERS=0 turns the pool off; tests and the bench set both
 * numbers with configurePool.
 */

export interface PoolSettings {
  /** Worker threads beside the main thread, which analyses too; 0 turns the pool off. */
  readonly workers: number;
  /** Stale loops a recheck needs before it uses the pool: a change with its handful of dependants stays on the main thread. */
  readonly minLoops: number;
}

/** More workers than this rarely pay: a recheck also parses states and writes rows on the main thread. */
const MAX_WORKERS = 3;
const MIN_LOOPS = 64;

let overrides: Partial<PoolSettings> = {};

/**
 * Workers for a machine with `cores` cores: one core is the main thread's (it
 * analyses its share), one is left to V8's own background threads (compiler,
 * garbage collector), which already make a lone analysing thread use about 1.4
 * cores. On 2 cores that leaves none: measured there, a worker beside the main
 * thread slowed every loop down 1.6 times and the recheck as a whole.
 */
export function defaultWorkers(cores: number): number {
  return Math.max(0, Math.min(cores - 2, MAX_WORKERS));
}

/** Overrides the pool settings for this process (tests, bench); pass {} to go back to the defaults. */
export function configurePool(s: Partial<PoolSettings>): void {
  overrides = { ...s };
}

function envWorkers(): number | undefined {
  const text = process.env.LOOPLEDGER_WORKERS;
  if (text === undefined || text.trim() === '') return undefined;
  const n = Number(text);
  return Number.isInteger(n) && n >= 0 ? n : undefined;
}

/** The settings in force. */
export function poolSettings(): PoolSettings {
  return {
    workers: overrides.workers ?? envWorkers() ?? defaultWorkers(os.availableParallelism()),
    minLoops: overrides.minLoops ?? MIN_LOOPS,
  };
}

let sourceMemo: URL | null | undefined;

/**
 * The worker's code. In the build it is dist/worker.js beside this chunk
 * (scripts/build.mjs emits it). Run from source (tsx, vitest) there is no such
 * file: worker.ts and what it imports are bundled here, once per process, with
 * esbuild (a dev dependency, so only ever loaded from source). Null when neither works.
 */
export function workerSource(): URL | null {
  if (sourceMemo !== undefined) return sourceMemo;
  const here = import.meta.url;
  if (!here.endsWith('.ts')) {
    const built = new URL('./worker.js', here);
    sourceMemo = fs.existsSync(fileURLToPath(built)) ? built : null;
    return sourceMemo;
  }
  try {
    const esbuild = createRequire(here)('esbuild') as typeof import('esbuild');
    const out = esbuild.buildSync({
      entryPoints: [fileURLToPath(new URL('./worker.ts', here))],
      bundle: true, format: 'esm', platform: 'node', target: 'node20', write: false, logLevel: 'silent',
    });
    sourceMemo = new URL(`data:text/javascript;base64,${Buffer.from(out.outputFiles[0]!.contents).toString('base64')}`);
  } catch {
    sourceMemo = null;
  }
  return sourceMemo;
}

/** Options that describe how the main program was started, not how any thread runs: a worker must not inherit them. */
const MAIN_ONLY = new Set(['-e', '--eval', '-p', '--print', '--input-type', '--import', '--require', '-r', '--loader', '--experimental-loader']);

/**
 * The process's Node options for a worker, less those that would break or slow
 * its start: `--input-type` (a worker given it refuses to start), eval code, and
 * loaders or preloads (the worker is one plain bundle and needs none).
 * Profiling and memory options pass through.
 */
export function workerExecArgv(argv: readonly string[] = process.execArgv): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    const name = a.startsWith('--') ? a.split('=')[0]! : a;
    if (!MAIN_ONLY.has(name)) out.push(a);
    else if (!a.includes('=') && i + 1 < argv.length) i++; // its value is the next word
  }
  return out;
}
