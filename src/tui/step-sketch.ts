import * as asciichart from 'asciichart';
import { formatNumber, formatTime } from '../model/units.js';
import { colourCurve, gridLines, LABEL_WIDTH, markRow, niceAxis, plotGrid, rowOf } from './chart.js';
import { resample } from './resample.js';
import { cleanText } from './sanitize.js';
import { truncateLines } from './text.js';
import type { SketchOptions } from './bode-sketch.js';
import type { StepVM } from './view-model.js';

/** `n` evenly spaced times from `t0` to `t1`. */
export function linearGrid(t0: number, t1: number, n: number): number[] {
  if (n < 2) return [t0];
  return Array.from({ length: n }, (_, i) => t0 + ((t1 - t0) * i) / (n - 1));
}

/** The time scale line: "s" in the label area, then tick labels on round time steps. */
export function timeScaleLine(t0: number, t1: number, n: number): string {
  const cells = Array.from('time'.padStart(LABEL_WIDTH - 1) + ' ' + ' '.repeat(n));
  const ax = niceAxis(t0, t1, Math.max(1, Math.floor(n / 10)));
  let free = LABEL_WIDTH;
  for (let t = ax.lo; t <= t1 + ax.step * 1e-9; t += ax.step) {
    if (t < t0 - ax.step * 1e-9) continue;
    const col = LABEL_WIDTH + Math.round(((t - t0) / (t1 - t0)) * (n - 1));
    const label = '|' + formatTime(Math.abs(t) < ax.step * 1e-6 ? 0 : t);
    if (col < free || col + label.length > cells.length) continue;
    for (let k = 0; k < label.length; k++) cells[col + k] = label[k]!;
    free = col + label.length + 1;
  }
  return cells.join('').trimEnd();
}

/**
 * The unit-step sketch: output y over effort u on a shared time axis, the final
 * value dotted on the output chart. Effort gets a third of the rows: its size
 * matters (saturation), its shape less.
 */
export function stepSketch(s: StepVM, opts: SketchOptions): string[] {
  const n = opts.width - LABEL_WIDTH;
  const ts = s.tS.filter(Number.isFinite);
  if (ts.length < 2 || n < 8) return ['no step response to draw' + (n < 8 ? ' (window too narrow)' : '')];
  const t0 = ts[0]!;
  const t1 = ts[ts.length - 1]!;
  const grid = linearGrid(t0, t1, n);
  const y = resample(s.tS, s.y, grid);
  const u = resample(s.tS, s.u, grid);
  const charts = Math.max(4, opts.height - 3);
  const uLines = Math.max(2, Math.round(charts / 3));
  const yLines = charts - uLines;
  const yFinite = y.filter(Number.isFinite);
  const uFinite = u.filter(Number.isFinite);
  const yAxis = niceAxis(Math.min(0, ...yFinite), Math.max(s.finalValue, ...yFinite), yLines - 1);
  const uAxis = niceAxis(Math.min(0, ...uFinite), Math.max(0, ...uFinite), uLines - 1);
  const yGrid = plotGrid(y, yAxis);
  const uGrid = plotGrid(u, uAxis);
  markRow(yGrid, rowOf(yAxis, s.finalValue), '.');
  markRow(uGrid, rowOf(uAxis, 0), '.');
  let yText = gridLines(yGrid);
  let uText = gridLines(uGrid);
  if (opts.colour) {
    yText = colourCurve(yText, asciichart.green);
    uText = colourCurve(uText, asciichart.magenta);
  }
  const peakU = Math.max(0, ...s.u.filter(Number.isFinite).map(Math.abs));
  const variant = cleanText(s.variant);
  const lines = [
    `output y  ${variant ? `[${variant}]  ` : ''}. final value ${formatNumber(s.finalValue, 3)}`,
    ...yText,
    `effort u  peak |u| ${formatNumber(peakU, 3)}`,
    ...uText,
    timeScaleLine(t0, t1, n),
  ];
  return opts.colour ? lines : truncateLines(lines, opts.width);
}
