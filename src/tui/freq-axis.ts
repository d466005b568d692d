import { toDisplayFrequency, type FreqUnit } from '../model/units.js';
import { LABEL_WIDTH } from './chart.js';

/**
 * The horizontal axis of the Bode sketch: one sample per terminal column on a
 * log-frequency grid, and the scale line under the chart that asciichart cannot
 * draw. Resampling is display work only: it picks what each column shows.
 */

/** `n` frequencies spaced evenly in log between `loRadS` and `hiRadS`. */
export function logGrid(loRadS: number, hiRadS: number, n: number): number[] {
  if (n < 2) return [loRadS];
  const a = Math.log10(loRadS);
  const b = Math.log10(hiRadS);
  return Array.from({ length: n }, (_, i) => 10 ** (a + ((b - a) * i) / (n - 1)));
}

/** Index of the grid sample nearest to `wRadS` (in log), or null when outside the grid. */
export function sampleIndex(grid: readonly number[], wRadS: number): number | null {
  if (grid.length === 0 || !(wRadS >= grid[0]! && wRadS <= grid[grid.length - 1]!)) return null;
  if (grid.length === 1) return 0;
  const a = Math.log10(grid[0]!);
  const b = Math.log10(grid[grid.length - 1]!);
  return Math.round(((Math.log10(wRadS) - a) / (b - a)) * (grid.length - 1));
}

/** "1", "20", "1k", "2.5M", "0.1": a tick value in few characters. */
export function tickLabel(x: number): string {
  const units: [number, string][] = [[1e6, 'M'], [1e3, 'k']];
  for (const [u, suffix] of units) if (x >= u) return `${Number((x / u).toPrecision(2))}${suffix}`;
  return String(Number(x.toPrecision(2)));
}

/** Tick values (display unit) inside [lo, hi]: decades, or 1-2-5 when the span is under two decades. */
export function frequencyTicks(lo: number, hi: number): number[] {
  const out: number[] = [];
  const first = Math.floor(Math.log10(lo));
  const last = Math.ceil(Math.log10(hi));
  const decades: number[] = [];
  for (let p = first; p <= last; p++) decades.push(10 ** p);
  const inside = (x: number) => x >= lo * (1 - 1e-9) && x <= hi * (1 + 1e-9);
  const mantissas = decades.filter(inside).length >= 2 ? [1] : [1, 2, 5];
  for (const d of decades) for (const m of mantissas) if (inside(m * d)) out.push(m * d);
  return out;
}

/**
 * The scale line under a sketch: the unit in the label area, then each tick's
 * label starting at its column, skipped where it would touch the previous one,
 * and `^` at each marked column (the crossover) where the line is still free.
 */
export function frequencyScaleLine(grid: readonly number[], unit: FreqUnit, markRadS: readonly number[] = []): string {
  const n = grid.length;
  const cells = Array.from((unit === 'hz' ? 'Hz' : 'rad/s').padStart(LABEL_WIDTH - 1) + ' ' + ' '.repeat(n));
  const lo = toDisplayFrequency(grid[0]!, unit);
  const hi = toDisplayFrequency(grid[n - 1]!, unit);
  let free = LABEL_WIDTH;
  for (const t of frequencyTicks(lo, hi)) {
    const i = sampleIndex(grid, t / toDisplayFrequency(1, unit));
    if (i === null) continue;
    const col = LABEL_WIDTH + i;
    const label = '|' + tickLabel(t);
    if (col < free || col + label.length > cells.length) continue;
    for (let k = 0; k < label.length; k++) cells[col + k] = label[k]!;
    free = col + label.length + 1;
  }
  for (const w of markRadS) {
    const i = sampleIndex(grid, w);
    if (i === null) continue;
    // Never straight after a label's text, where it would read as part of it ("10^").
    const c = LABEL_WIDTH + i;
    if (cells[c] === ' ' && (cells[c - 1] === ' ' || cells[c - 1] === '^')) cells[c] = '^';
  }
  return cells.join('').trimEnd();
}
