import { describe, expect, it } from 'vitest';
import { analyseLoop } from '../../src/analysis/loop.js';
import type { TransferFunction } from '../../src/model/tf.js';

const DEG = 180 / Math.PI;
const tf = (num: number[], den: number[], delayS = 0): TransferFunction => ({ num, den, delayS });
const ONE = tf([1], [1]);

/** Relative closeness check with a readable failure. */
function near(got: number | null, want: number, rel = 1e-9): void {
  expect(got).not.toBeNull();
  expect(Math.abs(got! - want) / Math.max(Math.abs(want), 1e-300)).toBeLessThan(rel);
}

describe('standard second-order loop wn^2/(s(s + 2 zeta wn)) in closed form', () => {
  // Ogata, Modern Control Engineering, 5th ed., Sec. 7-7 (phase margin vs damping ratio) and
  // Sec. 7-? frequency-domain correlation (resonant peak, bandwidth), from memory:
  //   wc = wn sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2),  PM = atan(2 zeta / sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2)),
  //   Mr = 1/(2 zeta sqrt(1 - zeta^2)) (zeta < 0.707),  wb = wn sqrt(1 - 2 zeta^2 + sqrt(4 zeta^4 - 4 zeta^2 + 2)).
  for (const [zeta, wn] of [[0.1, 3], [0.3, 50], [0.5, 20], [0.7, 1e3], [1.2, 0.4]] as const) {
    it(`zeta = ${zeta}, wn = ${wn} rad/s`, () => {
      const m = analyseLoop(tf([wn * wn], [0, 2 * zeta * wn, 1]), ONE);
      const root = Math.sqrt(Math.sqrt(1 + 4 * zeta ** 4) - 2 * zeta ** 2);
      const pm = Math.atan((2 * zeta) / root) * DEG;
      expect(m.gainCrossoversRadS).toHaveLength(1);
      near(m.gainCrossoversRadS[0]!, wn * root);
      near(m.phaseMarginDeg, pm);
      near(m.delayMarginS, pm / DEG / (wn * root));
      expect(m.phaseCrossoversRadS).toEqual([]);
      expect(m.gainMarginDb).toBeNull();
      near(m.bandwidthRadS, wn * Math.sqrt(1 - 2 * zeta ** 2 + Math.sqrt(4 * zeta ** 4 - 4 * zeta ** 2 + 2)), 1e-8);
      if (zeta < Math.SQRT1_2) near(m.peakComplementary, 1 / (2 * zeta * Math.sqrt(1 - zeta ** 2)), 1e-8);
      else near(m.peakComplementary, 1, 1e-12); // no resonance: |T| is largest at w = 0
      expect(m.stable).toBe(true);
      expect(m.systemType).toBe(1);
      near(m.kv, wn / (2 * zeta));
    });
  }

  it('K/(s(s+a)) with K = 400, a = 20: wc^2 = (-a^2 + sqrt(a^4 + 4K^2))/2 and PM = atan(a/wc)', () => {
    const m = analyseLoop(tf([400], [0, 20, 1]), ONE);
    const wc = Math.sqrt((-400 + Math.sqrt(160000 + 4 * 160000)) / 2);
    near(m.phaseMarginAtRadS, wc);
    near(m.phaseMarginDeg, Math.atan(20 / wc) * DEG);
  });
});

describe('gain margins in closed form', () => {
  it('K/(s(s+1)(s+2)): phase crossover at sqrt 2, GM = 20 log10(6/K); marginal at K = 6 (Routh array; Ogata, 5th ed., Sec. 5-6, from memory)', () => {
    for (const K of [1, 3, 12]) {
      const m = analyseLoop(tf([K], [0, 2, 3, 1]), ONE);
      expect(m.phaseCrossoversRadS).toHaveLength(1);
      near(m.phaseCrossoversRadS[0]!, Math.SQRT2);
      near(m.gainMarginDb, 20 * Math.log10(6 / K), 1e-9);
      expect(m.stable).toBe(K < 6);
      if (K < 6) {
        near(m.gainMarginUpperDb, 20 * Math.log10(6 / K), 1e-9);
        expect(m.gainMarginLowerDb).toBeNull();
      } else {
        expect(m.gainMarginUpperDb).toBeNull();
        expect(m.delayMarginS).toBeNull();
      }
    }
  });

  it('K/(s+a)^3: phase crossover at a sqrt 3 (60 deg per pole) where |L| = K/(2a)^3', () => {
    for (const a of [1e-5, 1, 1e5]) {
      const K = 4 * a ** 3; // GM = 20 log10(8/4) = 6.0206 dB
      const m = analyseLoop(tf([K], [a ** 3, 3 * a ** 2, 3 * a, 1]), ONE);
      near(m.phaseCrossoversRadS[0]!, a * Math.sqrt(3), 1e-9);
      near(m.gainMarginDb, 20 * Math.log10(2), 1e-9);
    }
  });

  it('an open-loop unstable plant 3/(s-1): L(0) = -3 counts as a phase crossover at w = 0 with GM = -9.54 dB', () => {
    const m = analyseLoop(tf([3], [-1, 1]), ONE);
    expect(m.phaseCrossoversRadS).toEqual([0]);
    near(m.gainMarginDb, -20 * Math.log10(3));
    near(m.gainMarginLowerDb, -20 * Math.log10(3));
    expect(m.gainMarginUpperDb).toBeNull();
    expect(m.stable).toBe(true); // closed loop s + 2
    near(m.gainCrossoversRadS[0]!, Math.sqrt(8));
  });

  it('a biproper loop -0.5 (s-2)/(s+3): L(inf) = -0.5 counts at w = inf with GM = 6.02 dB', () => {
    const m = analyseLoop(tf([1, -0.5], [3, 1]), ONE);
    expect(m.phaseCrossoversRadS).toEqual([Infinity]);
    near(m.gainMarginDb, 20 * Math.log10(2));
    expect(m.gainMarginAtRadS).toBe(Infinity);
  });
});

describe('pure delay in the loop: L = K e^{-sT}/s (|L| = K/w, angle L = -90 deg - wT, derived directly)', () => {
  const K = 10;
  const T = 0.05;
  const m = analyseLoop(tf([K], [0, 1], T), ONE);

  it('crossover at K, PM = 90 deg - K T, delay margin (pi/2 - K T)/K', () => {
    expect(m.gainCrossoversRadS).toHaveLength(1);
    near(m.gainCrossoversRadS[0]!, K);
    near(m.phaseMarginDeg, 90 - K * T * DEG);
    near(m.delayMarginS, (Math.PI / 2 - K * T) / K);
    expect(m.stable).toBe(true);
  });

  it('phase crossovers at (pi/2 + 2 pi k)/T with GM = 20 log10(w/K), listed while GM <= 60 dB', () => {
    const wk = (k: number) => (Math.PI / 2 + 2 * Math.PI * k) / T;
    const listed = m.phaseCrossoversRadS;
    expect(listed.length).toBeGreaterThan(3);
    listed.forEach((w, k) => {
      near(w, wk(k), 1e-9);
      near(m.gainMarginsDb[k]!, 20 * Math.log10(wk(k) / K), 1e-9);
      expect(m.gainMarginsDb[k]!).toBeLessThanOrEqual(60);
    });
    expect(20 * Math.log10(wk(listed.length) / K)).toBeGreaterThan(60);
    near(m.gainMarginDb, 20 * Math.log10(wk(0) / K));
  });

  it('becomes unstable once K T exceeds pi/2 (the delay margin is used up)', () => {
    expect(analyseLoop(tf([K], [0, 1], (Math.PI / 2 / K) * 0.99), ONE).stable).toBe(true);
    expect(analyseLoop(tf([K], [0, 1], (Math.PI / 2 / K) * 1.01), ONE).stable).toBe(false);
  });
});

describe('several gain crossovers and the reported phase margin', () => {
  it('reports the crossover of smallest |PM| with its sign and lists all of them', () => {
    // 10/s crosses at ~10 rad/s; a resonance at 100 rad/s with zeta = 0.01 lifts |L| to ~5 there,
    // so |L| crosses 1 twice more around 100 rad/s.
    const m = analyseLoop(tf([1e5], [0, 1e4, 2, 1]), ONE);
    expect(m.gainCrossoversRadS).toHaveLength(3);
    near(m.gainCrossoversRadS[0]!, 10, 0.02); // the resonance adds ~1 % to |L| at 10 rad/s
    expect(m.gainCrossoversRadS[1]!).toBeLessThan(100);
    expect(m.gainCrossoversRadS[2]!).toBeGreaterThan(100);
    const smallest = m.phaseMarginsDeg.reduce((a, b) => (Math.abs(b) < Math.abs(a) ? b : a));
    expect(m.phaseMarginDeg).toBe(smallest);
    for (const pm of m.phaseMarginsDeg) {
      expect(pm).toBeGreaterThan(-180);
      expect(pm).toBeLessThanOrEqual(180);
    }
  });
});
