import { describe, expect, it } from 'vitest';
import type { StepMetrics } from '../../src/model/metrics.js';
import type { Complex, TransferFunction } from '../../src/model/tf.js';
import { stepMetrics, stepResponse } from '../../src/analysis/step.js';

/** Unit-step metrics and samples against responses known in closed form. */

const tf = (num: number[], den: number[], delayS = 0): TransferFunction => ({ num, den, delayS });
const unity = tf([1], [1]);

function metricsOf(plant: TransferFunction, comp: TransferFunction, poles: Complex[]): StepMetrics {
  const { metrics, warnings } = stepMetrics(plant, comp, poles, true);
  expect(warnings).toEqual([]);
  expect(metrics).not.toBeNull();
  return metrics!;
}

/** First t in [a, b] where f crosses level upward, by bisection after a scan (f continuous). */
function firstUp(f: (t: number) => number, level: number, a: number, b: number): number {
  const n = 20000;
  let lo = a;
  for (let i = 1; i <= n; i++) {
    const t = a + ((b - a) * i) / n;
    if (f(t) >= level) {
      let hi = t;
      for (let it = 0; it < 80; it++) {
        const mid = (lo + hi) / 2;
        if (f(mid) >= level) hi = mid; else lo = mid;
      }
      return (lo + hi) / 2;
    }
    lo = t;
  }
  throw new Error('level not reached');
}

describe('standard second-order loop wn^2 / (s (s + 2 zeta wn))', () => {
  // Closed loop wn^2 / (s^2 + 2 zeta wn s + wn^2): percent overshoot 100 exp(-pi zeta / sqrt(1 - zeta^2)),
  // peak time pi / (wn sqrt(1 - zeta^2)). Ogata, Modern Control Engineering, 5th ed., sec. 5-3 (from memory).
  const wn = 5;
  for (const zeta of [0.15, 0.4, 0.6, 0.8]) {
    it(`zeta = ${zeta}`, () => {
      const wd = wn * Math.sqrt(1 - zeta * zeta);
      const poles = [{ re: -zeta * wn, im: wd }, { re: -zeta * wn, im: -wd }];
      const m = metricsOf(tf([wn * wn], [0, 2 * zeta * wn, 1]), unity, poles);
      expect(m.finalValue).toBe(1);
      expect(m.overshootPct).toBeCloseTo(100 * Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta)), 2);
      expect(Math.abs(m.peakTimeS! / (Math.PI / wd) - 1)).toBeLessThan(1e-4);
      expect(m.undershootPct).toBe(0);
      // Rise and settling have no closed form; the exact response y = 1 - e^(-zeta wn t)(cos wd t + zeta wn / wd sin wd t) gives them.
      const y = (t: number) => 1 - Math.exp(-zeta * wn * t) * (Math.cos(wd * t) + ((zeta * wn) / wd) * Math.sin(wd * t));
      expect(Math.abs(m.riseTimeS! / (firstUp(y, 0.9, 0, 10) - firstUp(y, 0.1, 0, 10)) - 1)).toBeLessThan(1e-4);
      // The envelope bounds settling from above: 2 % is left for good before ln(50 / sqrt(1 - zeta^2)) / (zeta wn).
      expect(m.settlingTimeS!).toBeLessThanOrEqual(Math.log(50 / Math.sqrt(1 - zeta * zeta)) / (zeta * wn));
      expect(Math.abs(y(m.settlingTimeS!) - 1)).toBeCloseTo(0.02, 5);
    });
  }
});

describe('very lightly damped loop (zeta = 1e-4): too long to follow to the end', () => {
  it('keeps the peak right (Ogata sec. 5-3 formulas) and says settling is unknown rather than guessing', () => {
    const wn = 10, zeta = 1e-4;
    const wd = wn * Math.sqrt(1 - zeta * zeta);
    const r = stepMetrics(tf([wn * wn], [0, 2 * zeta * wn, 1]), unity, [{ re: -zeta * wn, im: wd }, { re: -zeta * wn, im: -wd }], true);
    expect(r.metrics!.overshootPct).toBeCloseTo(100 * Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta)), 2);
    expect(Math.abs(r.metrics!.peakTimeS! / (Math.PI / wd) - 1)).toBeLessThan(1e-3);
    expect(r.metrics!.settlingTimeS).toBeNull();
    expect(r.warnings.join(' ')).toMatch(/settling time unknown/);
  });
});

describe('first-order lag 1 / (tau s + 1) as the closed loop of 1 / (tau s)', () => {
  // y = 1 - e^(-t/tau): 10 % at tau ln(10/9), 90 % at tau ln 10, so rise = tau ln 9; it enters 2 % at tau ln 50.
  it('rise time tau ln 9, settling tau ln 50, no overshoot, effort 1 at 0+', () => {
    const tau = 0.37;
    const m = metricsOf(tf([1], [0, tau]), unity, [{ re: -1 / tau, im: 0 }]);
    expect(m.riseTimeS!).toBeCloseTo(tau * Math.log(9), 7);
    expect(m.settlingTimeS!).toBeCloseTo(tau * Math.log(50), 7);
    expect(m.overshootPct).toBe(0);
    expect(m.peakTimeS).toBeNull();
    expect(m.peakEffort).toBeCloseTo(1, 12);
  });

  it('samples follow 1 - e^(-t/tau)', () => {
    const tau = 2;
    const r = stepResponse(tf([1], [0, tau]), unity);
    expect(r.tS.length).toBeGreaterThan(100);
    let worst = 0;
    for (let k = 0; k < r.tS.length; k++) worst = Math.max(worst, Math.abs(r.y[k]! - (1 - Math.exp(-r.tS[k]! / tau))));
    expect(worst).toBeLessThan(1e-12);
    expect(r.tS[r.tS.length - 1]!).toBeGreaterThan(5 * tau);
  });
});

describe('stiff loop: closed-loop poles at -0.1 and -1e4', () => {
  // L = K / (s (s + a)) with s^2 + a s + K = (s + 0.1)(s + 1e4); by partial fractions
  // y = 1 - (p2 e^(-p1 t) - p1 e^(-p2 t)) / (p2 - p1) with p1 = 0.1, p2 = 1e4.
  it('times match the two-exponential closed form without a sample-count warning', () => {
    const p1 = 0.1, p2 = 1e4;
    const m = metricsOf(tf([p1 * p2], [0, p1 + p2, 1]), unity, [{ re: -p1, im: 0 }, { re: -p2, im: 0 }]);
    const y = (t: number) => 1 - (p2 * Math.exp(-p1 * t) - p1 * Math.exp(-p2 * t)) / (p2 - p1);
    expect(m.riseTimeS!).toBeCloseTo(firstUp(y, 0.9, 0, 100) - firstUp(y, 0.1, 0, 100), 5);
    expect(m.settlingTimeS!).toBeCloseTo(firstUp((t) => -Math.abs(y(t) - 1), -0.02, 0, 100), 5);
  });
});

describe('integrator with delay under proportional control, K e^(-sT) / s', () => {
  // y'(t) = K (1 - y(t - T)), y = 0 for t <= T. Method of steps: on [jT, (j+1)T] with tau = t - jT,
  // y_j(tau) = y_(j-1)(T) + K int_0^tau (1 - y_(j-1)(s)) ds, y_0 = 0: each piece is an exact polynomial.
  const K = 5, T = 0.1;
  const pieces: number[][] = [[0]];
  const polyAt = (p: number[], x: number) => p.reduceRight((acc, c) => acc * x + c, 0);
  for (let j = 1; j < 60; j++) {
    const prev = pieces[j - 1]!;
    const next = [polyAt(prev, T), K];
    prev.forEach((c, i) => { next[i + 1] = (next[i + 1] ?? 0) - (K * c) / (i + 1); });
    pieces.push(next);
  }
  const y = (t: number) => {
    const j = Math.min(Math.floor(t / T), pieces.length - 1);
    return polyAt(pieces[j]!, t - j * T);
  };

  it('samples follow the piecewise-polynomial solution', () => {
    const r = stepResponse(tf([1], [0, 1], T), tf([K], [1]));
    let worst = 0;
    for (let k = 0; k < r.tS.length; k++) worst = Math.max(worst, Math.abs(r.y[k]! - y(r.tS[k]!)));
    expect(worst).toBeLessThan(1e-6);
  });

  it('overshoot, peak time, rise and settling match it', () => {
    // Closed-loop poles of s + K e^(-sT) = 0 matter here only for planning; pass the rightmost pair roughly.
    const m = metricsOf(tf([1], [0, 1], T), tf([K], [1]), [{ re: -3.5, im: 5.5 }, { re: -3.5, im: -5.5 }]);
    let tPk = 0, yPk = 0;
    for (let i = 0; i <= 200000; i++) {
      const t = (2 * i) / 200000;
      if (y(t) > yPk) { yPk = y(t); tPk = t; }
    }
    expect(m.overshootPct).toBeCloseTo(100 * (yPk - 1), 3);
    expect(Math.abs(m.peakTimeS! - tPk)).toBeLessThan(2e-5);
    expect(m.riseTimeS!).toBeCloseTo(firstUp(y, 0.9, 0, 2) - firstUp(y, 0.1, 0, 2), 5);
    let last = 0;
    for (let i = 0; i <= 400000; i++) {
      const t = (6 * i) / 400000;
      if (Math.abs(y(t) - 1) > 0.02) last = t;
    }
    expect(Math.abs(m.settlingTimeS! - last)).toBeLessThan(2e-5);
    expect(m.peakEffort).toBe(K);
  });
});

describe('PI on a pure gain with a short delay: C = a + k/s, P = g e^(-sT)', () => {
  // u = a e + k int e, e = 1 - g u(t - T). Method of steps on [jT, (j+1)T] with tau = t - jT:
  // u_j = a (1 - g u_(j-1)) + I_j, I_j(tau) = I_(j-1)(T) + k int_0^tau (1 - g u_(j-1)); y_j = g u_(j-1).
  // Each jump of u returns every T scaled by -a g, so the run starts on steps of T and
  // lengthens them (the implicit long-step map) once the echoes have faded.
  const a = 0.5, k = 2, g = 1, T = 0.01, DEG = 40;
  const polyAt = (p: number[], x: number) => p.reduceRight((acc, c) => acc * x + c, 0);
  const uPieces: number[][] = [];
  let prev: number[] = [0];
  let iEnd = 0;
  for (let j = 0; j < 1200; j++) {
    const e = prev.map((c, i) => (i === 0 ? 1 : 0) - g * c);
    const integ = [iEnd, ...e.map((c, i) => (k * c) / (i + 1))].slice(0, DEG);
    const u = integ.map((c, i) => c + a * (e[i] ?? 0));
    uPieces.push(u);
    iEnd = polyAt(integ, T);
    prev = u;
  }
  const y = (t: number) => {
    const j = Math.floor(t / T + 1e-9);
    return j === 0 ? 0 : g * polyAt(uPieces[j - 1]!, t - j * T);
  };

  it('samples follow the method-of-steps solution through the echoes and the long steps', () => {
    const r = stepResponse(tf([g], [1], T), tf([k, a], [0, 1]));
    expect(r.warnings).toEqual([]);
    let worst = 0;
    for (let i = 1; i < r.tS.length; i++) worst = Math.max(worst, Math.abs(r.y[i]! - y(r.tS[i]!)));
    expect(worst).toBeLessThan(1e-8);
    // The run went well past the echoes on steps longer than the delay.
    expect(r.tS[r.tS.length - 1]! - r.tS[r.tS.length - 2]!).toBeGreaterThan(1.5 * T);
  });
});

describe('final value, jumps at 0+ and refusals', () => {
  it('type-0 loop: final value L(0) / (1 + L(0)) exactly', () => {
    // L = 20 / ((s + 1)(s + 5)): L(0) = 4, so y_f = 4/5; closed-loop poles of s^2 + 6 s + 25.
    const m = metricsOf(tf([10], [5, 6, 1]), tf([2], [1]), [{ re: -3, im: 4 }, { re: -3, im: -4 }]);
    expect(m.finalValue).toBe(0.8);
  });

  it('feedthrough in C and P: y(0+) = L(inf)/(1 + L(inf)), u(0+) = C(inf)/(1 + L(inf))', () => {
    // C = 2 (s + 1)/(s + 3), P = (s + 2)/(s + 1): L(inf) = 2, so y(0+) = u(0+) = 2/3.
    const r = stepResponse(tf([2, 1], [1, 1]), tf([2, 2], [3, 1]));
    expect(r.y[0]).toBeCloseTo(2 / 3, 14);
    expect(r.u[0]).toBeCloseTo(2 / 3, 14);
  });

  it('PI on a lag: the largest effort is the proportional kick at 0+', () => {
    // C = 2 + 1/s, P = 1/(s + 1): u(0+) = 2, then u falls towards 1/P(0) = 1; poles of s^2 + 3 s + 1.
    const m = metricsOf(tf([1], [1, 1]), tf([1, 2], [0, 1]), [{ re: (-3 + Math.sqrt(5)) / 2, im: 0 }, { re: (-3 - Math.sqrt(5)) / 2, im: 0 }]);
    expect(m.peakEffort).toBeCloseTo(2, 10);
  });

  it('improper compensator: null metrics, saying a proper loop is needed', () => {
    const r = stepMetrics(tf([1], [0, 1, 1]), tf([1, 2, 0.5], [0, 1]), [{ re: -1, im: 0 }], true);
    expect(r.metrics).toBeNull();
    expect(r.warnings.join(' ')).toMatch(/proper loop/);
  });

  it('unstable or marginal loops: null metrics', () => {
    expect(stepMetrics(tf([1], [-1, 1]), unity, [{ re: 1, im: 0 }], false).metrics).toBeNull();
    // L = 1/s^2: closed-loop poles +-j exactly.
    const r = stepMetrics(tf([1], [0, 0, 1]), unity, [{ re: 0, im: 1 }, { re: 0, im: -1 }], true);
    expect(r.metrics).toBeNull();
    expect(r.warnings.join(' ')).toMatch(/imaginary axis/);
  });

  it('zero DC gain (differentiating compensator): warning and no times', () => {
    // C = s/(s + 1), P = 1/(s + 2): L(0) = 0 so y_f = 0; u(0+) = C(inf) / (1 + L(inf)) = 1; poles of s^2 + 4 s + 2.
    const r = stepMetrics(tf([1], [2, 1]), tf([0, 1], [1, 1]), [{ re: -2 + Math.SQRT2, im: 0 }, { re: -2 - Math.SQRT2, im: 0 }], true);
    expect(r.warnings.join(' ')).toMatch(/DC gain is zero/);
    expect(r.metrics!.finalValue).toBe(0);
    expect(r.metrics!.riseTimeS).toBeNull();
    expect(r.metrics!.settlingTimeS).toBeNull();
    expect(r.metrics!.peakEffort).toBeCloseTo(1, 12);
  });
});
