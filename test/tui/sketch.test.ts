import * as asciichart from 'asciichart';
import { describe, expect, it } from 'vitest';
import { frequencyResponse, logGridRadS } from '../../src/analysis/freq.js';
import { bodeSketch } from '../../src/tui/bode-sketch.js';
import { cleanSeries, LABEL_WIDTH, niceAxis, plotGrid, rowOf } from '../../src/tui/chart.js';
import { frequencyScaleLine, frequencyTicks, logGrid, sampleIndex } from '../../src/tui/freq-axis.js';
import { resampleLogKeepingPeaks } from '../../src/tui/resample.js';
import { stepSketch } from '../../src/tui/step-sketch.js';
import type { BodeVM } from '../../src/tui/view-model.js';

const ESCAPE = /\u001b/;

describe('chart axis', () => {
  it('puts both ends on round steps and never exceeds the rows asked for', () => {
    for (const [lo, hi, rows] of [[-37, 52, 7], [-0.3, 1.46, 8], [-180, -95, 5], [0, 1, 1], [-1e-3, 2e-3, 6]] as const) {
      const a = niceAxis(lo, hi, rows);
      expect(a.rows).toBeLessThanOrEqual(rows);
      expect(a.lo).toBeLessThanOrEqual(lo);
      expect(a.hi).toBeGreaterThanOrEqual(hi);
      const m = a.step / 10 ** Math.floor(Math.log10(a.step) + 1e-12);
      expect([1, 2, 2.5, 5].some((x) => Math.abs(x - m) < 1e-9)).toBe(true);
    }
  });

  it('places a value on the row where asciichart itself draws it', () => {
    const a = niceAxis(-60, 45, 7);
    for (const v of [-60, -20, 0, 15, 40]) {
      const g = plotGrid([v, v, v, v], a);
      const drawn = g.cells.findIndex((r) => r.slice(LABEL_WIDTH + 1).includes('─'));
      expect(drawn).toBe(rowOf(a, v));
      expect(g.cells).toHaveLength(a.rows + 1);
    }
  });

  it('replaces NaN by a neighbour and clamps infinities instead of throwing', () => {
    expect(cleanSeries([NaN, 1, NaN, Infinity, -Infinity, 3], -5, 5)).toEqual([1, 1, 1, 5, -5, 3]);
    expect(cleanSeries([NaN, NaN], -2, 2)).toEqual([-2, -2]);
    expect(() => plotGrid([NaN, Infinity, 2, -Infinity], niceAxis(-3, 3, 4))).not.toThrow();
  });
});

describe('frequency axis', () => {
  it('labels decades at the columns of their frequencies', () => {
    const grid = logGrid(0.1, 1000, 73);
    const line = frequencyScaleLine(grid, 'rad');
    for (const f of [0.1, 1, 10, 100]) {
      const col = line.indexOf('|' + (f < 1 ? '0.1' : String(f)));
      expect(col).toBe(LABEL_WIDTH + sampleIndex(grid, f)!);
    }
  });

  it('never glues a crossover mark to the end of a label', () => {
    const grid = logGrid(1, 1000, 73);
    const right = grid[sampleIndex(grid, 10)! + 3]!;
    const line = frequencyScaleLine(grid, 'rad', [right, grid[40]!]);
    expect(line).not.toContain('10^');
    expect(line).toContain('^');
  });

  it('uses 1-2-5 ticks when the span is under two decades, in Hz when asked', () => {
    expect(frequencyTicks(3, 60)).toEqual([5, 10, 20, 50]);
    const grid = logGrid(2 * Math.PI * 3, 2 * Math.PI * 60, 50);
    expect(frequencyScaleLine(grid, 'hz')).toMatch(/^ +Hz .*\|5 .*\|10 .*\|20/);
  });
});

/**
 * L(s) = 1/(s(s+1)): |L(jw)| = 1 where w^4 + w^2 - 1 = 0, w_c = sqrt((sqrt 5 - 1)/2)
 * = 0.78615 rad/s (closed form); the phase runs from -90 deg towards -180 deg.
 */
const WC = Math.sqrt((Math.sqrt(5) - 1) / 2);
function unitPlantBode(): BodeVM {
  const fr = frequencyResponse({ num: [1], den: [0, 1, 1], delayS: 0 }, logGridRadS(0.01, 100, 400));
  return { variant: '', wRadS: Array.from(fr.wRadS), magDb: Array.from(fr.magDb), phaseDeg: Array.from(fr.phaseDeg), crossoversRadS: [WC], phaseCrossoversRadS: [] };
}

describe('Bode sketch', () => {
  const opts = { width: 78, height: 16, unit: 'rad' as const, colour: false };

  it('fits the space, dots the 0 dB and -180 deg rows, and marks the crossover column', () => {
    const lines = bodeSketch(unitPlantBode(), opts);
    expect(lines.length).toBeLessThanOrEqual(16);
    expect(Math.max(...lines.map((l) => Array.from(l).length))).toBeLessThanOrEqual(78);
    const zeroDb = lines.find((l) => /^ +0┤/.test(l))!;
    expect(zeroDb).toMatch(/\.{5}/);
    const m180 = lines.find((l) => /^ +-180┤/.test(l))!;
    expect(m180).toMatch(/\.{5}/);
    // The ':' column is where the crossover lies on the log grid of the chart.
    const grid = logGrid(0.01, 100, 78 - LABEL_WIDTH);
    const col = LABEL_WIDTH + sampleIndex(grid, WC)!;
    const marked = lines.filter((l) => Array.from(l)[col] === ':').length;
    expect(marked).toBeGreaterThan(3);
    expect(Array.from(lines[lines.length - 1]!)[col]).toBe('^');
    // At that column the magnitude curve is on the 0 dB row.
    expect(['─', '╮', '╰', '╯', '╭']).toContain(Array.from(zeroDb)[col]);
    expect(lines[0]).toContain('crossover 0.786rad/s');
  });

  it('has no escape sequences without colour, and colours only the curves with it', () => {
    expect(bodeSketch(unitPlantBode(), opts).join('\n')).not.toMatch(ESCAPE);
    const coloured = bodeSketch(unitPlantBode(), { ...opts, colour: true });
    expect(coloured.join('\n')).toMatch(ESCAPE);
    expect(coloured.map((l) => l.replace(/\u001b\[\d+m/g, ''))).toEqual(bodeSketch(unitPlantBode(), opts));
  });

  it('draws a second response over the first in * (no colour needed to tell them apart)', () => {
    const a = unitPlantBode();
    const b = { ...a, magDb: a.magDb.map((x) => x + 12) };
    const lines = bodeSketch(a, opts, b);
    expect(lines.join('\n')).toContain('*');
    expect(lines.join('\n')).toContain('─');
  });

  it('survives data with NaN and infinities, and says when there is nothing to draw', () => {
    const a = unitPlantBode();
    const bad = { ...a, magDb: a.magDb.map((x, i) => (i % 7 === 0 ? NaN : i === 3 ? Infinity : x)) };
    expect(() => bodeSketch(bad, opts)).not.toThrow();
    expect(bodeSketch({ ...a, wRadS: [], magDb: [], phaseDeg: [] }, opts)[0]).toMatch(/no frequency response/);
  });

  it('keeps a resonance narrower than one column visible', () => {
    // A peak of +20 dB on a single sample between two columns.
    const w = logGridRadS(1, 1000, 1000);
    const v = Array.from(w, (x) => (Math.abs(x - 31.7) < 0.05 ? 20 : 0));
    const grid = logGrid(1, 1000, 40);
    expect(Math.max(...resampleLogKeepingPeaks(Array.from(w), v, grid))).toBe(20);
  });
});

describe('step sketch', () => {
  it('draws output over effort with the final value dotted, in the space given', () => {
    const tS = Array.from({ length: 200 }, (_, i) => i * 0.001);
    const y = tS.map((t) => 1 - Math.exp(-t / 0.02));
    const u = tS.map((t) => 5 * Math.exp(-t / 0.02));
    const lines = stepSketch({ variant: '', tS, y, u, finalValue: 1 }, { width: 70, height: 14, unit: 'hz', colour: false });
    expect(lines.length).toBeLessThanOrEqual(14);
    expect(lines.find((l) => /^ +1┤/.test(l))).toMatch(/\.{5}/);
    expect(lines.join('\n')).toContain('peak |u| 5');
    expect(lines[lines.length - 1]).toMatch(/time \|0s .*\|50ms/);
    expect(lines.join('\n')).not.toMatch(ESCAPE);
  });
});

describe('asciichart assumptions', () => {
  it('lays out label, axis, then one cell per sample after the first (what LABEL_WIDTH relies on)', () => {
    const text = asciichart.plot([0, 0, 0], { height: 2, min: -1, max: 1, offset: 2, format: (x: number) => x.toFixed(0).padStart(LABEL_WIDTH) });
    const zeroRow = text.split('\n')[1]!;
    expect(zeroRow.slice(0, LABEL_WIDTH)).toBe('     0');
    expect(Array.from(zeroRow).slice(LABEL_WIDTH + 1, LABEL_WIDTH + 3).join('')).toBe('──');
  });
});
