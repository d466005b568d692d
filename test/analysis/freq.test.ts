import { describe, expect, it } from 'vitest';
import { factorTf } from '../../src/analysis/factors.js';
import { frequencyRangeRadS, frequencyResponse, logGridRadS } from '../../src/analysis/freq.js';
import { brentMin } from '../../src/analysis/scalar.js';
import { tfEvalJw } from '../../src/analysis/tf.js';
import type { TransferFunction } from '../../src/model/tf.js';

const DEG = 180 / Math.PI;

describe('frequencyResponse', () => {
  it('pure delay: |G| = 1 and phase = -wT continuously, never wrapped (delay factor e^{-jwT}: Franklin, Powell, Emami-Naeini, Feedback Control of Dynamic Systems, 7th ed., Sec. 6.2, from memory)', () => {
    const T = 0.01;
    const w = logGridRadS(1, 1e5, 400);
    const r = frequencyResponse({ num: [1], den: [1], delayS: T }, w);
    for (let i = 0; i < w.length; i++) {
      expect(r.magDb[i]).toBeCloseTo(0, 12);
      expect(r.phaseDeg[i]! / (-w[i]! * T * DEG)).toBeCloseTo(1, 12);
    }
    expect(r.phaseDeg[w.length - 1]).toBeLessThan(-57000); // 1000 rad of lag, kept continuous
  });

  it('first-order lag 1/(s+1) at its corner: -3.0103 dB and -45 deg (any introductory text; 20 log10(1/sqrt 2))', () => {
    const r = frequencyResponse({ num: [1], den: [1, 1], delayS: 0 }, [1]);
    expect(r.magDb[0]).toBeCloseTo(-10 * Math.log10(2), 12);
    expect(r.phaseDeg[0]).toBeCloseTo(-45, 12);
  });

  it('lead network (Ts+1)/(aTs+1): maximum phase asin((1-a)/(1+a)) at 1/(T sqrt a) with 10 log10(1/a) dB (Ogata, Modern Control Engineering, 5th ed., Sec. 7-11, from memory)', () => {
    const T = 0.02;
    for (const a of [0.05, 0.1, 0.3]) {
      const lead: TransferFunction = { num: [1, T], den: [1, a * T], delayS: 0 };
      const f = factorTf(lead);
      const phaseAt = (u: number) => frequencyResponse(f, [Math.exp(u)]).phaseDeg[0]!;
      const [u, negMax] = brentMin((x) => -phaseAt(x), Math.log(1), Math.log(1e4), 1e-12);
      expect(-negMax).toBeCloseTo(Math.asin((1 - a) / (1 + a)) * DEG, 9);
      expect(Math.exp(u) / (1 / (T * Math.sqrt(a)))).toBeCloseTo(1, 5);
      const atMax = frequencyResponse(lead, [1 / (T * Math.sqrt(a))]);
      expect(atMax.magDb[0]).toBeCloseTo(10 * Math.log10(1 / a), 10);
    }
  });

  it('agrees with direct polynomial evaluation (Horner) on a resonant loop with delay', () => {
    const tf: TransferFunction = { num: [3e4, 200], den: [0, 9e4, 12, 1], delayS: 2e-4 };
    const w = logGridRadS(0.1, 1e5, 50);
    const r = frequencyResponse(tf, w);
    for (let i = 0; i < w.length; i++) {
      const [re, im] = tfEvalJw(tf, w[i]!);
      const m = Math.hypot(re, im);
      expect(Math.hypot(r.re[i]! - re, r.im[i]! - im) / m).toBeLessThan(1e-11);
    }
  });

  it('unwraps through a lightly damped pole pair: phase falls monotonically from 0 to -180 deg, no 360 deg jump', () => {
    const tf: TransferFunction = { num: [1e4], den: [1e4, 2, 1], delayS: 0 }; // zeta = 0.01 at 100 rad/s
    const r = frequencyResponse(tf, logGridRadS(1, 1e4, 2000));
    for (let i = 1; i < r.phaseDeg.length; i++) expect(r.phaseDeg[i]! - r.phaseDeg[i - 1]!).toBeLessThanOrEqual(0);
    expect(r.phaseDeg[r.phaseDeg.length - 1]).toBeCloseTo(-180, 1);
  });
});

describe('frequency grids', () => {
  it('logGridRadS hits both ends and is log-spaced', () => {
    const g = logGridRadS(0.1, 1000, 5);
    expect(Array.from(g)).toEqual([0.1, 1, 10, 100, 1000].map((x, i) => (i === 4 ? 1000 : g[i])));
    for (let i = 0; i < 5; i++) expect(g[i]! / [0.1, 1, 10, 100, 1000][i]!).toBeCloseTo(1, 12);
  });

  it('frequencyRangeRadS spans two decades beyond the corners and the delay', () => {
    const [lo, hi] = frequencyRangeRadS({ num: [1], den: [2, 3, 1], delayS: 0.001 }); // poles at 1 and 2, 1/T = 1000
    expect(lo).toBeCloseTo(0.01, 12);
    expect(hi).toBeCloseTo(1e5, 6);
  });
});
