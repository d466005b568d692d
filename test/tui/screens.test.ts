import { describe, expect, it } from 'vitest';
import { buildFrame, wrapMessage } from '../../src/tui/build-screen.js';
import { compareScreen, deltaValue } from '../../src/tui/compare-screen.js';
import { initialState } from '../../src/tui/dash-state.js';
import { frameSize } from '../../src/tui/layout.js';
import type { CompareVM, OverviewVM } from '../../src/tui/view-model.js';

const rev = (revision: number) => ({ revision, author: 'ana', at: '2030-01-01T00:00:00Z', note: '', kind: 'comp', status: null });

describe('compare screen', () => {
  const c: CompareVM = {
    loopId: 'X/vel', unit: 'hz', a: rev(3), b: rev(5), statusA: 'fail', statusB: 'pass',
    changes: [
      { what: 'compensator', key: null, from: 'gain:2 pi:5Hz', to: 'gain:2 pi:8Hz lp1:300Hz' },
      { what: 'requirement', key: 'pm>=', from: 'pm>=45deg', to: 'pm>=50deg' },
    ],
    blocksA: [{ kind: 'gain', k: 2 }, { kind: 'pi', zeroRadS: 2 * Math.PI * 5 }],
    blocksB: [{ kind: 'gain', k: 2 }, { kind: 'pi', zeroRadS: 2 * Math.PI * 8 }, { kind: 'lowpass1', cornerRadS: 2 * Math.PI * 300 }],
    deltas: [
      { variant: 'nominal', metric: 'phaseMarginDeg', from: 41.04, to: 52.5, delta: 11.46 },
      { variant: 'nominal', metric: 'crossoverRadS', from: 2 * Math.PI * 20, to: 2 * Math.PI * 25, delta: 2 * Math.PI * 5 },
      { variant: 'nominal', metric: 'step.settlingTimeS', from: 0.0312, to: 0.0201, delta: -0.0111 },
    ],
    bodeA: [], bodeB: [],
  };

  it('puts the two compensators side by side, marking rows that differ, and lists the other changes', () => {
    const text = compareScreen(c, initialState(), 'hz', 80, 30, false).lines.map((l) => l.text);
    expect(text[0]).toBe('X/vel  r3 x fail  ->  r5 + pass');
    const gain = text.find((l) => l.includes('gain:2'))!;
    expect(gain.startsWith('   ')).toBe(true);
    expect(text.find((l) => l.includes('pi:5Hz'))).toMatch(/^ ~ +pi:5Hz +pi:8Hz$/);
    expect(text.find((l) => l.includes('lp1:300Hz'))).toMatch(/^ ~ +lp1:300Hz$/);
    expect(text).toContain('requirement pm>=: pm>=45deg -> pm>=50deg');
  });

  it('shows each metric at both revisions and the signed change, frequencies in the display unit', () => {
    const text = compareScreen(c, initialState(), 'hz', 80, 30, false).lines.map((l) => l.text).join('\n');
    expect(text).toMatch(/phase margin deg +41 +52\.5 +\+11\.5/);
    expect(text).toMatch(/crossover Hz +20 +25 +\+5/);
    expect(text).toMatch(/settling time +31\.2ms +20\.1ms +-11\.1ms/);
    expect(deltaValue('crossoverRadS', 2 * Math.PI * 5, 'rad')).toBe('31.4');
  });
});

describe('frame', () => {
  const vm: OverviewVM = { machine: 'rig', storePath: 'a.db', unit: 'hz', lastChange: null, rows: [] };
  const data = { overview: vm, detail: null, compare: null, methods: [], live: { current: null, lastGood: null }, loadError: null };

  it('is one line shorter than the window, never shorter than the minimum, and says how to start on an empty store', () => {
    const f = buildFrame(initialState(), data, frameSize(80, 24), false, 0);
    expect(1 + f.body.length + 1).toBe(23);
    expect(f.body.map((l) => l.text).join('\n')).toContain('no loops yet');
    expect(frameSize(20, 5)).toEqual({ width: 40, height: 10, body: 8 });
    expect(frameSize(undefined, undefined)).toEqual({ width: 80, height: 23, body: 21 });
  });

  it('wraps a long message over at most three lines above the footer', () => {
    const long = 'conflict: X/vel has changed since revision 5: revision 6 was saved by bo at 2030-01-01T00:00:00Z ("faster"); nothing was written; look at the log, redo your change on revision 6, or force it';
    const lines = wrapMessage(long, 40);
    expect(lines.length).toBe(3);
    expect(lines.every((l) => l.length <= 40)).toBe(true);
    const f = buildFrame({ ...initialState(), message: { text: long, kind: 'error' } }, data, frameSize(80, 24), false, 0);
    expect(f.body).toHaveLength(21);
    expect(f.body.slice(-3).map((l) => l.tone)).toEqual(['error', 'error', 'error']);
  });
});
