import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { prettyJson } from '../src/engine/canonical-json.js';
import { DUMP_FORMAT, DUMP_FORMAT_VERSION, type AxisDump, type LoopDump, type MachineDump } from '../src/engine/dump.js';
import { loadMachine } from '../src/engine/index.js';
import { closeAnalysisPool } from '../src/engine/pool.js';
import { configurePool, poolSettings } from '../src/engine/pool-setup.js';
import type { LoopState } from '../src/engine/types.js';
import type { Block } from '../src/model/blocks.js';

/**
 * Store and engine figures: a machine of 1,000 loops (250 axes, each a current ->
 * velocity -> position cascade plus one stand-alone loop), then
 *  - a full recheck (every loop analysed again), as configured (workers by core count,
 *    LOOPLEDGER_WORKERS), then once more on worker threads beside the main thread,
 *  - one inner-loop change with its propagation to the two loops outside it,
 *  - a warm in-process check (all results fresh: reads only),
 *  - a cold `loopledger check --json` process on this store and on the demo store.
 * Targets: full recheck < 1 s, one change < 20 ms, cold check of the demo < 400 ms.
 */

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const AXES = Number(process.env.LL_BENCH_AXES ?? 250);
const TIME = '2030-01-01T00:00:00.000Z';

const tf = (num: number[], den: number[], delayS = 0) => ({ num, den, delayS });

function loop(name: string, inner: string | null, plantText: string, plant: ReturnType<typeof tf>, blocks: Block[], reqs: [string, 'pm' | 'gm' | 'sep', number][]): LoopDump {
  const state: LoopState = {
    plants: { nominal: { text: plantText, tf: plant } },
    requirements: reqs.map(([text, metric, value]) => ({ metric, op: '>=', value, text })),
    compensator: { blocks },
  };
  return { name, inner, sampleRateHz: 16000, revisions: [{ number: 1, parent: null, kind: 'create', author: 'bench', time: TIME, note: '', summary: 'bench', state }] };
}

/** One axis: physics-flavoured models whose gains vary a little from axis to axis. */
function axis(i: number): AxisDump {
  const k = 1 + 0.2 * Math.sin(i);
  const margins: [string, 'pm' | 'gm', number][] = [['pm>=45', 'pm', 45], ['gm>=6dB', 'gm', 6]];
  return {
    name: `A${String(i).padStart(3, '0')}`, note: '', author: 'bench', createdAt: TIME,
    loops: [
      // Winding R-L with a 50 us computation delay; PI with its zero on the electrical pole.
      loop('cur', null, `${500 * k}/(s+750)*exp(-0.00005*s)`, tf([500 * k], [750, 1], 5e-5),
        [{ kind: 'gain', k: 12.5 }, { kind: 'pi', zeroRadS: 750 }], margins),
      // Torque constant over inertia behind the closed current loop.
      loop('vel', 'cur', `${5000 * k}/s`, tf([5000 * k], [0, 1]),
        [{ kind: 'gain', k: 0.24 }, { kind: 'pi', zeroRadS: 200 }, { kind: 'lowpass1', cornerRadS: 5000 }], [...margins, ['sep>=4', 'sep', 4]]),
      loop('pos', 'vel', '1/s', tf([1], [0, 1]), [{ kind: 'gain', k: 150 * k }], [...margins, ['sep>=4', 'sep', 4]]),
      // A stand-alone tension loop: damped second order with a 1 ms transport delay, lead compensated.
      loop('tension', null, `${100 * k}/(s^2+20*s+100)*exp(-0.001*s)`, tf([100 * k], [100, 20, 1], 1e-3),
        [{ kind: 'gain', k: 2 }, { kind: 'lead', zeroRadS: 10, poleRadS: 40 }], margins),
    ],
  };
}

const ms = (t0: bigint) => Number(process.hrtime.bigint() - t0) / 1e6;
const fmt = (x: number) => (x >= 100 ? x.toFixed(0) : x.toFixed(1));

/** Median wall time of `runs` cold processes of `loopledger ... check --json`, or why it was skipped. */
function coldCheck(store: string, cwd: string, runs = 5): string {
  const bin = path.join(ROOT, 'bin', 'loopledger.mjs');
  if (!fs.existsSync(path.join(ROOT, 'dist', 'main.js'))) return 'skipped (no dist/ build: run npm run build)';
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = process.hrtime.bigint();
    // stdout ignored: the JSON of 1,000 loops is bigger than spawnSync's buffer, and writing it is the process's job.
    const r = spawnSync(process.execPath, [bin, '--store', store, 'check', '--json'], { cwd, encoding: 'utf8', stdio: ['ignore', 'ignore', 'pipe'] });
    times.push(ms(t0));
    if (r.status !== 0 && r.status !== 1) return `skipped (check exited ${r.status}: ${(r.stderr || '').trim().split('\n')[0]})`;
  }
  times.sort((a, b) => a - b);
  return `${fmt(times[Math.floor(times.length / 2)]!)} ms median of ${runs}`;
}

/** The bench machine as dump text (also handy for profiling: load it once, check it many times). */
export function benchDump(axes = AXES): string {
  const dump: MachineDump = { format: DUMP_FORMAT, formatVersion: DUMP_FORMAT_VERSION, machine: { name: 'bench', unit: 'hz', createdAt: TIME }, axes: Array.from({ length: axes }, (_, i) => axis(i)) };
  return prettyJson(dump);
}

/** Builds the 1,000-loop store and returns one line per figure. */
export async function benchStore(): Promise<string[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'loopledger-bench-'));
  const lines: string[] = [];
  try {
    const file = path.join(dir, 'big.loopledger.db');
    let t0 = process.hrtime.bigint();
    const m = await loadMachine(file, benchDump(), { author: 'bench' });
    const loops = m.listLoops().length;
    lines.push(`store: ${loops} loops on ${AXES} axes loaded and checked in ${fmt(ms(t0))} ms`);

    const { workers } = poolSettings();
    t0 = process.hrtime.bigint();
    const all = await m.recheckAll();
    const how = workers === 0 ? 'on the main thread' : `on the main thread and ${workers} worker${workers === 1 ? '' : 's'}`;
    lines.push(`full recheck of ${all.reanalysed} loops ${how}: ${fmt(ms(t0))} ms (target < 1000 ms); ${all.counts.pass} pass, ${all.counts.fail} fail, ${all.counts.unstable} unstable, ${all.counts.error} error`);

    // The pool against the main thread alone, taking turns so both see the same JIT warmth and machine load.
    const forced = Math.max(1, workers);
    configurePool({ workers: forced });
    await m.recheckAll(); // starts and warms the workers, as a long-lived process would have
    const alone: number[] = [];
    const pooled: number[] = [];
    for (let i = 0; i < 3; i++) {
      for (const [w, into] of [[0, alone], [forced, pooled]] as const) {
        configurePool({ workers: w });
        t0 = process.hrtime.bigint();
        await m.recheckAll();
        into.push(ms(t0));
      }
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;
    lines.push(`  taking turns, median of 3: ${fmt(median(alone))} ms on the main thread alone, ${fmt(median(pooled))} ms with ${forced} worker${forced === 1 ? '' : 's'} beside it`);
    configurePool({});
    closeAnalysisPool();

    const changes: number[] = [];
    for (let i = 0; i < 5; i++) {
      t0 = process.hrtime.bigint();
      const o = await m.setCompensator(`A${String((i * 17) % AXES).padStart(3, "0")}/cur`, [`gain:${12 + i / 10}`, 'pi:750rad/s']);
      changes.push(ms(t0));
      if (o.results.length !== 3) throw new Error(`expected the change to recheck 3 loops, got ${o.results.length}`);
    }
    changes.sort((a, b) => a - b);
    lines.push(`one inner-loop change, rechecking it and 2 outer loops: ${fmt(changes[2]!)} ms median of 5 (target < 20 ms)`);

    t0 = process.hrtime.bigint();
    const warm = await m.check();
    lines.push(`warm check of ${warm.loops.length} loops (fresh results, ${warm.reanalysed} analysed): ${fmt(ms(t0))} ms`);
    m.close();

    lines.push(`cold 'check --json' of the ${loops}-loop store: ${coldCheck(file, dir)}`);
    const demo = path.join(dir, 'demo.loopledger.db');
    const made = spawnSync(process.execPath, [path.join(ROOT, 'bin', 'loopledger.mjs'), 'demo'], { cwd: dir, encoding: 'utf8' });
    lines.push(made.status === 0 && fs.existsSync(demo)
      ? `cold 'check --json' of the demo store: ${coldCheck(demo, dir)} (target < 400 ms)`
      : `cold 'check --json' of the demo store: skipped (demo command unavailable: ${(made.stderr || '').trim().split('\n')[0]})`);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
  return lines;
}

// Run directly: npx tsx bench/store-bench.ts
if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  for (const line of await benchStore()) console.log(line);
}
