import * as asciichart from 'asciichart';
import { formatFrequency, type FreqUnit } from '../model/units.js';
import {
  colourCurve, gridLines, LABEL_WIDTH, markColumn, markRow, niceAxis, overlay, plotGrid, rowOf, type Axis,
} from './chart.js';
import { frequencyScaleLine, logGrid, sampleIndex } from './freq-axis.js';
import { resampleLogKeepingPeaks } from './resample.js';
import { cleanText } from './sanitize.js';
import { truncateLines } from './text.js';
import type { BodeVM } from './view-model.js';

/** What the Bode sketch is drawn into. */
export interface SketchOptions {
  readonly width: number;
  /** Total lines available, captions and scale line included. */
  readonly height: number;
  readonly unit: FreqUnit;
  /** Colour the curves with raw ANSI (never under NO_COLOR). */
  readonly colour: boolean;
  /** Names of the two curves when a second one is drawn over the first (e.g. "r4", "r7"). */
  readonly legend?: readonly [string, string];
}

// The magnitude window: a loop's gain is read near 0 dB, so the chart spends its
// rows there, at most 20 dB a row; gain far above or below is clamped to the edge
// rather than squeezing the crossover region into one row.
const MAX_DB_PER_ROW = 20;
const PHASE_STEPS_DEG = [5, 10, 15, 30, 45, 90, 180, 360];
const PHASE_WINDOW_DEG: [number, number] = [-720, 360];

const finite = (xs: readonly number[]) => xs.filter(Number.isFinite);

/** The magnitude axis: the data's span, always including 0 dB, cut to the window around 0 dB. */
function magAxis(values: readonly number[], rows: number): Axis {
  const v = finite(values);
  const span = rows * MAX_DB_PER_ROW;
  let hi = Math.min(Math.max(0, ...v), span / 2);
  const lo = Math.max(Math.min(0, ...v), hi - span);
  hi = Math.min(Math.max(0, ...v), lo + span);
  return niceAxis(lo, hi, rows);
}

/** The phase axis on steps that divide 180, including -180 deg whenever the phase comes near it. */
function phaseAxis(values: readonly number[], rows: number, wantMinus180: boolean): Axis {
  const v = finite(values);
  let lo = Math.max(Math.min(...v, 0), PHASE_WINDOW_DEG[0]);
  const hi = Math.min(Math.max(...v, lo + 1), PHASE_WINDOW_DEG[1]);
  if (wantMinus180) lo = Math.min(lo, -180);
  return niceAxis(lo, hi, rows, PHASE_STEPS_DEG, true);
}

/** Splits the chart rows between magnitude and phase (magnitude gets the odd one). */
function splitRows(height: number): { magRows: number; phaseRows: number } {
  const charts = Math.max(4, height - 3); // two captions and the scale line
  const magLines = Math.ceil(charts / 2);
  return { magRows: magLines - 1, phaseRows: charts - magLines - 1 };
}

/**
 * The ASCII Bode sketch of the open loop: magnitude (dB) over phase (deg) on a
 * shared log-frequency axis with one sample per column, the 0 dB and -180 deg
 * rows dotted, gain crossovers as a column of `:` and a `^` on the scale line.
 * With `other`, a second response (e.g. an older revision) is drawn over it in `*`.
 */
export function bodeSketch(b: BodeVM, opts: SketchOptions, other?: BodeVM): string[] {
  const n = opts.width - LABEL_WIDTH;
  const all = other ? [b, other] : [b];
  const ws = all.flatMap((x) => finite(x.wRadS).filter((w) => w > 0));
  if (b.wRadS.length < 2 || ws.length < 2 || n < 8) return ['no frequency response to draw' + (n < 8 ? ' (window too narrow)' : '')];
  const grid = logGrid(Math.min(...ws), Math.max(...ws), n);
  const mags = all.map((x) => resampleLogKeepingPeaks(x.wRadS, x.magDb, grid));
  const phases = all.map((x) => resampleLogKeepingPeaks(x.wRadS, x.phaseDeg, grid));
  const { magRows, phaseRows } = splitRows(opts.height);
  const mAxis = magAxis(mags.flat(), magRows);
  const pAxis = phaseAxis(phases.flat(), phaseRows, finite(phases.flat()).some((p) => p < -90) || b.phaseCrossoversRadS.length > 0);

  const crossCols = b.crossoversRadS.map((w) => sampleIndex(grid, w));
  const mag = plotGrid(mags[0]!, mAxis);
  const phase = plotGrid(phases[0]!, pAxis);
  if (other) {
    overlay(mag, plotGrid(mags[1]!, mAxis, true));
    overlay(phase, plotGrid(phases[1]!, pAxis, true));
  }
  for (const c of crossCols) {
    markColumn(mag, c, ':');
    markColumn(phase, c, ':');
  }
  markRow(mag, rowOf(mAxis, 0), '.');
  markRow(phase, rowOf(pAxis, -180), '.');

  let magLines = gridLines(mag);
  let phaseLines = gridLines(phase);
  if (opts.colour && !other) {
    magLines = colourCurve(magLines, asciichart.cyan);
    phaseLines = colourCurve(phaseLines, asciichart.yellow);
  }
  const fc = b.crossoversRadS.map((w) => formatFrequency(w, opts.unit, 3)).join(', ');
  const variant = cleanText(b.variant);
  const cross = fc === '' ? 'no gain crossover' : `: crossover ${fc}`;
  const lines = [
    `|L| dB  ${variant ? `[${variant}]  ` : ''}${cross}  . 0 dB${other ? `  ${opts.legend?.[0] ?? 'this'} line, ${opts.legend?.[1] ?? 'other'} *` : ''}`,
    ...magLines,
    `phase deg  . -180 deg${pAxis.lo > -180 ? ' (off scale)' : ''}`,
    ...phaseLines,
    frequencyScaleLine(grid, opts.unit, b.crossoversRadS),
  ];
  return opts.colour ? lines : truncateLines(lines, opts.width);
}
