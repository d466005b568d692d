import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { gainCrossoversRadS } from '../../src/analysis/crossovers.js';
import { factorTf } from '../../src/analysis/factors.js';
import { analyseLoop } from '../../src/analysis/loop.js';
import { polyMul, polyScaleVariable } from '../../src/analysis/poly.js';
import { classifyPoles, closedLoopPoles, delayClosedLoopPoles, padeDelay, rhpZeroCount } from '../../src/analysis/stability.js';
import { tfEvalJw } from '../../src/analysis/tf.js';
import type { Complex, TransferFunction } from '../../src/model/tf.js';

const ONE: TransferFunction = { num: [1], den: [1], delayS: 0 };
/** Frequency-domain properties only: no step simulation. */
const FREQ = { step: false } as const;

/** A random loop: stable and unstable real poles, damped pairs, optional integrator, fewer zeros than poles. */
const loopArb = fc
  .record({
    realPoles: fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 0, maxLength: 4 }),
    unstable: fc.boolean(),
    pairs: fc.array(fc.record({ logWn: fc.double({ min: -1, max: 3, noNaN: true }), zeta: fc.double({ min: 0.02, max: 0.9, noNaN: true }) }), { maxLength: 3 }),
    integrator: fc.boolean(),
    zeros: fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { maxLength: 2 }),
    nmpZero: fc.boolean(),
    logGain: fc.double({ min: -2, max: 4, noNaN: true }),
  })
  .map((r): TransferFunction => {
    let den = r.integrator ? [0, 1] : [1, 0.5];
    r.realPoles.forEach((lp, i) => {
      const p = 10 ** lp;
      den = polyMul(den, [r.unstable && i === 0 ? -p : p, 1]);
    });
    for (const { logWn, zeta } of r.pairs) {
      const wn = 10 ** logWn;
      den = polyMul(den, [wn * wn, 2 * zeta * wn, 1]);
    }
    let num = [10 ** r.logGain];
    // At most deg(den) - 1 zeros, so the loop is strictly proper.
    r.zeros.slice(0, den.length - 2).forEach((lz, i) => {
      const z = 10 ** lz;
      num = polyMul(num, [r.nmpZero && i === 0 ? -z : z, 1]);
    });
    return { num, den, delayS: 0 };
  });

/** Distance of the nearest pole to the imaginary axis, relative to its magnitude (floored at 0.01 rad/s, near the origin). */
function axisCloseness(ps: readonly Complex[]): number {
  return Math.min(...ps.map((p) => Math.abs(p.re) / Math.max(Math.hypot(p.re, p.im), 0.01)));
}

describe('Nyquist (argument principle) and closed-loop poles agree on delay-free loops', () => {
  it('fast-check: the right-half-plane count equals the number of unstable roots of D + N', () => {
    fc.assert(
      fc.property(loopArb, (loop) => {
        const poles = closedLoopPoles(loop);
        fc.pre(axisCloseness(poles) > 1e-6);
        const f = factorTf(loop);
        const z = rhpZeroCount(loop, f, gainCrossoversRadS(loop, f, null));
        expect(z.reliable).toBe(true);
        expect(z.count).toBe(poles.filter((p) => p.re > 0).length);
      }),
      { numRuns: 300, seed: 20240611 },
    );
  });

  it('counts two unstable poles of 800/(s(s+10)) with a 20 ms delay (checked against the exact roots)', () => {
    const loop: TransferFunction = { num: [800], den: [0, 10, 1], delayS: 0.02 };
    const f = factorTf(loop);
    expect(rhpZeroCount(loop, f, gainCrossoversRadS(loop, f, null)).count).toBe(2);
    const roots = delayClosedLoopPoles(loop);
    expect(roots.filter((r) => r.re > 0)).toHaveLength(2);
  });

  it('integrators on the axis need no special care: K/s^2 with a lead is stable, without it marginal', () => {
    expect(analyseLoop({ num: [100], den: [0, 0, 1], delayS: 0.001 }, { num: [1, 0.2], den: [1, 0.02], delayS: 0 }).stable).toBe(true);
    const marginal = analyseLoop({ num: [100], den: [0, 0, 1], delayS: 0 }, ONE, FREQ);
    expect(marginal.stable).toBe(false);
    expect(marginal.warnings.join(' ')).toMatch(/imaginary axis/);
  });
});

describe('gain margin and delay margin mean what they say (fast-check)', () => {
  it('scaling the loop gain by 10^(GM/20) puts a closed-loop pole at j w_p', () => {
    fc.assert(
      fc.property(loopArb, (loop) => {
        const m = analyseLoop(loop, ONE, FREQ);
        const finite = m.phaseCrossoversRadS.map((w, i) => [w, m.gainMarginsDb[i]!] as const).filter(([w]) => w > 0 && Number.isFinite(w));
        for (const [w, gm] of finite) {
          const k = 10 ** (gm / 20);
          const poles = closedLoopPoles({ num: loop.num.map((c) => c * k), den: loop.den, delayS: 0 });
          const nearest = Math.min(...poles.map((p) => Math.hypot(p.re, Math.abs(p.im) - w)));
          expect(nearest / w).toBeLessThan(1e-6);
        }
      }),
      { numRuns: 200, seed: 7 },
    );
  });

  it('a delay just below the delay margin keeps the loop stable, just above it does not', () => {
    fc.assert(
      fc.property(loopArb, (loop) => {
        const m = analyseLoop(loop, ONE, FREQ);
        fc.pre(m.stable && m.delayMarginS !== null && Number.isFinite(m.delayMarginS) && m.delayMarginS > 0);
        fc.pre(axisCloseness(m.closedLoopPoles) > 1e-3);
        const dm = m.delayMarginS!;
        expect(analyseLoop({ ...loop, delayS: dm * 0.98 }, ONE, FREQ).stable).toBe(true);
        expect(analyseLoop({ ...loop, delayS: dm * 1.02 }, ONE, FREQ).stable).toBe(false);
      }),
      { numRuns: 60, seed: 11 },
    );
  });

  it('Ms is never below 1/|1 + L| anywhere (dense Horner scan), so PM >= 2 asin(1/(2 Ms)) and GM+ >= Ms/(Ms-1) hold (Skogestad & Postlethwaite, Multivariable Feedback Control, 2nd ed., Sec. 2.4.3, from memory)', () => {
    fc.assert(
      fc.property(loopArb, (loop) => {
        const m = analyseLoop(loop, ONE, FREQ);
        fc.pre(Number.isFinite(m.peakSensitivity));
        let scanMax = 0;
        for (let i = 0; i <= 4000; i++) {
          const [re, im] = tfEvalJw(loop, 10 ** (-4 + (9 * i) / 4000));
          scanMax = Math.max(scanMax, 1 / Math.hypot(1 + re, im));
        }
        expect(m.peakSensitivity).toBeGreaterThanOrEqual(scanMax * (1 - 1e-9));
        // |1 + L(jw_c)| = 2 sin(|PM|/2) >= 1/Ms (absolute slack for loops with PM = 0 exactly, where Ms = inf)
        for (const pm of m.phaseMarginsDeg) expect(2 * Math.sin((Math.abs(pm) * Math.PI) / 360)).toBeGreaterThanOrEqual(1 / m.peakSensitivity - 1e-9);
        if (m.gainMarginUpperDb !== null && m.peakSensitivity > 1) {
          expect(10 ** (m.gainMarginUpperDb / 20)).toBeGreaterThanOrEqual((m.peakSensitivity / (m.peakSensitivity - 1)) * (1 - 1e-9));
        }
      }),
      { numRuns: 150, seed: 3 },
    );
  });
});

describe('frequency scaling: L(s/c) has the same margins at c times the frequencies', () => {
  it('fast-check over c from 1e-4 to 1e4, with a delay T/c', () => {
    fc.assert(
      fc.property(loopArb, fc.constantFrom(1e-4, 1e-2, 1e2, 1e4), (loop, c) => {
        const base = analyseLoop({ ...loop, delayS: 0.001 }, ONE, FREQ);
        // |L(0)| = 1 makes w = 0 a tangential crossover; its neighbours are not well defined.
        fc.pre(Math.abs(Math.abs(base.kp) - 1) > 1e-6);
        const scaled = analyseLoop({ num: polyScaleVariable(loop.num, 1 / c), den: polyScaleVariable(loop.den, 1 / c), delayS: 0.001 / c }, ONE, FREQ);
        expect(scaled.stable).toBe(base.stable);
        expect(scaled.gainCrossoversRadS.length).toBe(base.gainCrossoversRadS.length);
        base.gainCrossoversRadS.forEach((w, i) => expect(scaled.gainCrossoversRadS[i]! / (w * c)).toBeCloseTo(1, 7));
        base.phaseMarginsDeg.forEach((pm, i) => expect(scaled.phaseMarginsDeg[i]!).toBeCloseTo(pm, 6));
        if (Number.isFinite(base.peakSensitivity)) expect(scaled.peakSensitivity / base.peakSensitivity).toBeCloseTo(1, 7);
        else expect(scaled.peakSensitivity).toBe(base.peakSensitivity);
      }),
      { numRuns: 60, seed: 5 },
    );
  });
});

describe('closed-loop poles', () => {
  it('classifies poles on, left of and right of the axis', () => {
    expect(classifyPoles([{ re: -1, im: 2 }])).toBe('stable');
    expect(classifyPoles([{ re: 0, im: 2 }])).toBe('marginal');
    expect(classifyPoles([{ re: 1e-3, im: 2 }])).toBe('unstable');
  });

  it('Pade (1,1) and (2,2) of e^{-sT}: (1 - sT/2)/(1 + sT/2) and (1 - sT/2 + s^2T^2/12)/(1 + sT/2 + s^2T^2/12) (Franklin, Powell, Emami-Naeini, 7th ed., Sec. 5.6, from memory)', () => {
    const T = 0.3;
    expect(padeDelay(T, 1)).toEqual([[1, -T / 2], [1, T / 2]]);
    const [n2, d2] = padeDelay(T, 2);
    expect(n2[2]).toBeCloseTo((T * T) / 12, 15);
    expect(d2[1]).toBeCloseTo(T / 2, 15);
  });

  it('delay roots satisfy D + N e^{-sT} = 0 exactly; s + K e^{-sT} with K T = pi/2 has its root pair on the axis at +-jK', () => {
    const K = 4;
    const T = Math.PI / 2 / K;
    const roots = delayClosedLoopPoles({ num: [K], den: [0, 1], delayS: T });
    const onAxis = roots.find((r) => r.im > 0 && Math.abs(r.im - K) < 1e-6 * K);
    expect(onAxis).toBeDefined();
    expect(Math.abs(onAxis!.re)).toBeLessThan(1e-9);
    for (const r of roots) {
      const e = Math.exp(-T * r.re);
      const fr = r.re + K * e * Math.cos(T * r.im);
      const fi = r.im - K * e * Math.sin(T * r.im);
      expect(Math.hypot(fr, fi) / (Math.hypot(r.re, r.im) + K * e)).toBeLessThan(1e-10);
    }
  });
});
