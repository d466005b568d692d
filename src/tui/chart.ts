import * as asciichart from 'asciichart';
import { formatNumber } from '../model/units.js';

/**
 * asciichart, tamed for a frame of fixed size: a y range on round steps so the
 * chart is exactly as tall as asked and its labels are round numbers; data
 * cleaned (asciichart throws on NaN) and clamped (its min/max only widen);
 * reference rows and marker columns drawn into the empty cells afterwards.
 *
 * Layout of each line: a label of `LABEL_WIDTH` cells, the axis cell, then one
 * cell per sample after the first. So sample i sits at text column LABEL_WIDTH + i.
 */
export const LABEL_WIDTH = 6;

/** Round steps for a y axis: 1, 2, 2.5, 5 times a power of ten. */
export const DECIMAL_STEPS = [1, 2, 2.5, 5];

/** A y axis: `rows` steps of `step` from `lo` to `hi`. */
export interface Axis {
  readonly lo: number;
  readonly hi: number;
  readonly step: number;
  readonly rows: number;
}

/**
 * The smallest round step that spans [lo, hi] in at most `maxRows` steps, with
 * both ends on multiples of the step. `mantissas` are tried at every power of
 * ten (e.g. [1, 2, 5]), or used as they are with `fixed` (phase: 15, 30, 45, 90...).
 */
export function niceAxis(lo: number, hi: number, maxRows: number, mantissas = DECIMAL_STEPS, fixed = false): Axis {
  const rowsWanted = Math.max(1, maxRows);
  if (!(hi > lo)) {
    hi = lo + 1;
    lo = lo - 1;
  }
  const candidates: number[] = [];
  if (fixed) candidates.push(...mantissas);
  else {
    const p0 = Math.floor(Math.log10((hi - lo) / rowsWanted)) - 1;
    for (let p = p0; p <= p0 + 3; p++) for (const m of mantissas) candidates.push(m * 10 ** p);
  }
  candidates.sort((a, b) => a - b);
  for (const step of candidates) {
    const a = Math.floor(lo / step + 1e-9) * step;
    const b = Math.ceil(hi / step - 1e-9) * step;
    const rows = Math.round((b - a) / step);
    if (rows <= rowsWanted) return { lo: a, hi: b, step, rows: Math.max(rows, 1) };
  }
  const step = candidates[candidates.length - 1]!;
  const a = Math.floor(lo / step) * step;
  return { lo: a, hi: a + rowsWanted * step, step, rows: rowsWanted };
}

/** Replaces NaN by the nearest finite neighbour and clamps into [lo, hi] (so +-Infinity land on the edges). */
export function cleanSeries(values: readonly number[], lo: number, hi: number): number[] {
  const out = values.map((v) => (Number.isNaN(v) ? NaN : Math.min(hi, Math.max(lo, v))));
  let last = NaN;
  for (let i = 0; i < out.length; i++) if (Number.isNaN(out[i]!)) out[i] = last; else last = out[i]!;
  last = NaN;
  for (let i = out.length - 1; i >= 0; i--) if (Number.isNaN(out[i]!)) out[i] = last; else last = out[i]!;
  return out.map((v) => (Number.isNaN(v) ? lo : v));
}

/** A plotted chart as a grid of single-width cells, with the axis it was drawn on. */
export interface ChartGrid {
  readonly cells: string[][];
  readonly axis: Axis;
}

type Symbols = [string, string, string, string, string, string, string, string, string, string];
// asciichart draws '┼' on the row it takes for zero (mirrored when the range is
// not symmetric) and at the first sample: a plain axis reads truer.
const SYMBOLS: Symbols = ['┤', '┤', '╶', '╴', '─', '╰', '╭', '╮', '╯', '│'];
/** Symbols for a second series drawn over a first: all ASCII, so the two tell apart without colour. */
const SECOND_SYMBOLS: Symbols = ['┤', '┤', '*', '*', '*', '*', '*', '*', '*', '*'];

/** Plots one series (already on the sample grid) on `axis`; `second` draws it with `*`. */
export function plotGrid(series: readonly number[], axis: Axis, second = false): ChartGrid {
  const data = cleanSeries(series, axis.lo, axis.hi);
  if (data.length < 2) data.push(data[0] ?? axis.lo, data[0] ?? axis.lo);
  const text = asciichart.plot(data, {
    height: axis.rows,
    min: axis.lo,
    max: axis.hi,
    offset: 2,
    format: (x: number) => formatNumber(Math.abs(x) < axis.step * 1e-6 ? 0 : x, 3).padStart(LABEL_WIDTH).slice(-LABEL_WIDTH),
    symbols: second ? SECOND_SYMBOLS : SYMBOLS,
  });
  const cells = text.split('\n').map((line) => Array.from(line.trimEnd().padEnd(LABEL_WIDTH + data.length)));
  return { cells, axis };
}

/** Row index (0 = top) where `value` is drawn, or null when off the chart. */
export function rowOf(axis: Axis, value: number): number | null {
  if (value < axis.lo - axis.step / 2 || value > axis.hi + axis.step / 2) return null;
  return axis.rows - Math.round((value - axis.lo) / axis.step);
}

/** Draws `ch` into the empty cells of one row, right of the axis. */
export function markRow(g: ChartGrid, row: number | null, ch: string): void {
  if (row === null || row < 0 || row >= g.cells.length) return;
  const r = g.cells[row]!;
  for (let c = LABEL_WIDTH + 1; c < r.length; c++) if (r[c] === ' ') r[c] = ch;
}

/** Draws `ch` into the empty cells of the column of sample `i`. */
export function markColumn(g: ChartGrid, i: number | null, ch: string): void {
  if (i === null) return;
  const c = LABEL_WIDTH + i;
  for (const r of g.cells) if (c > LABEL_WIDTH && c < r.length && r[c] === ' ') r[c] = ch;
}

/** Copies the drawn cells of `top` onto `base` wherever `base` is empty (same axis and size). */
export function overlay(base: ChartGrid, top: ChartGrid): void {
  base.cells.forEach((r, y) => {
    const t = top.cells[y] ?? [];
    for (let c = LABEL_WIDTH + 1; c < r.length; c++) if (r[c] === ' ' && t[c] !== undefined && t[c] !== ' ') r[c] = t[c]!;
  });
}

/** The grid as text lines, trailing blanks removed. */
export function gridLines(g: ChartGrid): string[] {
  return g.cells.map((r) => r.join('').trimEnd());
}

/** Colours the curve cells (right of the axis) of already-built lines with a raw ANSI colour. */
export function colourCurve(lines: readonly string[], colour: string): string[] {
  return lines.map((l) => {
    const chars = Array.from(l);
    const head = chars.slice(0, LABEL_WIDTH + 1).join('');
    const body = chars.slice(LABEL_WIDTH + 1).map((ch) => (/[─│╭╮╯╰*]/.test(ch) ? colour + ch + asciichart.reset : ch));
    return head + body.join('');
  });
}
