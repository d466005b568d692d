import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { batchLine, loadAnalysis } from '../src/cli/commands/calc.js';

/**
 * Calculator figures: 2,000 varied loops (loop order 2-12, a quarter with a delay)
 * analysed in one process through the `calc --batch` line handler (parse, full
 * contract metrics including the step response, JSON), one order-8 loop on its own,
 * and a cold `loopledger calc` process. Targets: order-8 loop well under 1 ms median,
 * cold process under 400 ms.
 */

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const LOOPS = Number(process.env.LL_BENCH_LOOPS ?? 2000);

/** Small deterministic generator so every run analyses the same loops. */
function rng(seed: number): () => number {
  let x = seed >>> 0;
  return () => {
    x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
    return x / 2 ** 32;
  };
}

const fmt = (x: number) => Number(x.toPrecision(4)).toString();

/** One invented servo loop as a batch line: plant of order 1-9 in time-constant form, a compensator of order 0-3. */
function loopLine(r: () => number): { line: string; order: number } {
  const factors: string[] = [];
  let order = 0;
  const plantOrder = 1 + Math.floor(r() * 9);
  if (r() < 0.6) { factors.push('s'); order++; }
  while (order < plantOrder) {
    const w = 10 ** (-0.5 + 4 * r());
    if (r() < 0.4 && order + 2 <= plantOrder) {
      factors.push(`(s^2/${fmt(w * w)}+${fmt((2 * (0.02 + 0.5 * r())) / w)}*s+1)`);
      order += 2;
    } else {
      factors.push(`(s/${fmt(w)}+1)`);
      order++;
    }
  }
  const delay = r() < 0.25 ? `*exp(-${fmt(10 ** (-4 + 2 * r()))}*s)` : '';
  const plant = `${fmt(10 ** (4 * r() - 1))}/(${factors.join('*')})${delay}`;
  const kind = Math.floor(r() * 4);
  const wc = 10 ** (4 * r() - 1);
  const comps = [
    `${fmt(10 ** (2 * r() - 1))}`,
    `${fmt(10 ** (2 * r() - 1))}*(1+${fmt(wc / 5)}/s)`,
    `${fmt(10 ** (2 * r() - 1))}*(s/${fmt(wc / 3)}+1)/(s/${fmt(wc * 3)}+1)`,
    `${fmt(10 ** (2 * r() - 1))}*(1+${fmt(wc / 5)}/s)*(s/${fmt(wc / 3)}+1)/((s/${fmt(wc * 3)}+1)*(s/${fmt(wc * 10)}+1))`,
  ];
  const compOrder = [0, 1, 2, 3][kind]!;
  return { line: JSON.stringify({ plant, comp: comps[kind] }), order: Math.min(order + compOrder, 12) };
}

/** The value at quantile q of sorted numbers. */
function quantile(sorted: readonly number[], q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))]!;
}

/** Runs the calculator benchmark and returns the lines to print. */
export async function benchCalc(): Promise<string[]> {
  const { analyse, toJson } = await loadAnalysis();
  const r = rng(20240611);
  const lines = Array.from({ length: LOOPS }, () => loopLine(r));
  for (const { line } of lines.slice(0, 200)) batchLine(line, analyse, toJson); // warm-up (JIT)

  const times: number[] = [];
  let rss = process.memoryUsage().rss;
  let errors = 0;
  const t0 = process.hrtime.bigint();
  for (const { line } of lines) {
    const a = process.hrtime.bigint();
    const out = JSON.stringify(batchLine(line, analyse, toJson));
    times.push(Number(process.hrtime.bigint() - a) / 1e3);
    if (out.startsWith('{"error"')) errors++;
    rss = Math.max(rss, process.memoryUsage().rss);
  }
  const totalS = Number(process.hrtime.bigint() - t0) / 1e9;
  const sorted = [...times].sort((x, y) => x - y);

  // A stable order-8 loop (PM 28 deg, GM 12 dB), so the timing includes the step simulation.
  const eight = JSON.stringify({ plant: '1*(s/300+1)/(s*(s^2/9e4+0.02*s/300+1)*(s/2000+1)*(s/50+1))', comp: '0.8*(1+5/s)*(s/15+1)/(s/150+1)/(s/3000+1)' });
  const eightTimes: number[] = [];
  for (let i = 0; i < 1000; i++) {
    const a = process.hrtime.bigint();
    const line = batchLine(eight, analyse, toJson);
    if (i === 0 && !JSON.stringify(line).includes('"overshoot_pct"')) throw new Error('bench: the order-8 loop must be stable so its step response is timed');
    if (i >= 300) eightTimes.push(Number(process.hrtime.bigint() - a) / 1e3);
  }
  eightTimes.sort((x, y) => x - y);

  const out = [
    `calc --batch path, ${LOOPS} loops (order 2-12, ${lines.filter((l) => l.line.includes('exp(')).length} with delay, ${errors} refused):`,
    `  ${fmt(LOOPS / totalS)} loops/s; per loop median ${fmt(quantile(sorted, 0.5))} us, p99 ${fmt(quantile(sorted, 0.99))} us; peak RSS ${fmt(rss / 2 ** 20)} MiB`,
    `  one stable order-8 loop (type 2, resonance, PI + lead + low-pass), full metrics with step: median ${fmt(quantile(eightTimes, 0.5))} us, p99 ${fmt(quantile(eightTimes, 0.99))} us`,
  ];
  out.push(coldCalc());
  return out;
}

/** Median wall time of 7 cold `loopledger calc` processes (needs `npm run build`). */
function coldCalc(): string {
  const bin = path.join(ROOT, 'bin', 'loopledger.mjs');
  if (!existsSync(path.join(ROOT, 'dist', 'main.js'))) return '  cold calc process: skipped (run `npm run build` first)';
  const args = [bin, 'calc', '--plant', '400/(s*(s+20))', '--comp', '1', '--json'];
  const ms: number[] = [];
  for (let i = 0; i < 7; i++) {
    const a = process.hrtime.bigint();
    const p = spawnSync(process.execPath, args, { encoding: 'utf8' });
    ms.push(Number(process.hrtime.bigint() - a) / 1e6);
    if (p.status !== 0) return `  cold calc process: failed (${p.stderr.trim()})`;
  }
  ms.sort((x, y) => x - y);
  return `  cold \`loopledger calc --json\` process: median ${fmt(ms[3]!)} ms of 7 (min ${fmt(ms[0]!)}, max ${fmt(ms[6]!)})`;
}
