import { describe, expect, it } from 'vitest';
import { polyMul } from '../../src/analysis/poly.js';
import { polyRoots } from '../../src/analysis/roots.js';
import type { Complex } from '../../src/model/tf.js';

// Polynomials are built from chosen roots, so the true roots are known exactly;
// the check is how well the companion-matrix route recovers them.

/** Product of (s - r) over real roots, ascending coefficients. */
function fromRealRoots(rs: number[]): number[] {
  return rs.reduce<number[]>((p, r) => polyMul(p, [-r, 1]), [1]);
}

/** Largest relative distance from each wanted root to the nearest found one. */
function worstRelativeError(want: Complex[], got: Complex[]): number {
  expect(got.length).toBe(want.length);
  let worst = 0;
  for (const w of want) {
    let best = Infinity;
    for (const g of got) best = Math.min(best, Math.hypot(g.re - w.re, g.im - w.im) / Math.max(Math.hypot(w.re, w.im), 1e-300));
    worst = Math.max(worst, best);
  }
  return worst;
}

describe('polyRoots', () => {
  it('finds small integer roots to machine precision', () => {
    const got = polyRoots(fromRealRoots([-1, -2, -3, 4]));
    expect(worstRelativeError([-1, -2, -3, 4].map((re) => ({ re, im: 0 })), got)).toBeLessThan(1e-13);
  });

  it('returns zero roots exactly and keeps their multiplicity', () => {
    const got = polyRoots([0, 0, 0, 5, 1]); // s^3 (s + 5)
    expect(got.filter((r) => r.re === 0 && r.im === 0)).toHaveLength(3);
    expect(got.find((r) => r.re !== 0)!.re).toBeCloseTo(-5, 12);
  });

  it('returns exact conjugate pairs for complex roots', () => {
    const got = polyRoots([9e4, 12, 1]); // s^2 + 12 s + 9e4
    expect(got[0]!.re).toBeCloseTo(-6, 12);
    expect(Math.abs(got[0]!.im)).toBeCloseTo(Math.sqrt(9e4 - 36), 9);
    expect(got[0]!.im).toBe(-got[1]!.im);
  });

  it('recovers 40 real roots spread over six decades (0.1 to 1e5)', () => {
    const rs = Array.from({ length: 40 }, (_, k) => -0.1 * 1e6 ** (k / 39));
    const got = polyRoots(fromRealRoots(rs));
    expect(worstRelativeError(rs.map((re) => ({ re, im: 0 })), got)).toBeLessThan(1e-8);
  });

  it('recovers the 40th roots of unity (s^40 - 1)', () => {
    const p = new Array<number>(41).fill(0);
    p[0] = -1;
    p[40] = 1;
    const want = Array.from({ length: 40 }, (_, k) => ({ re: Math.cos((2 * Math.PI * k) / 40), im: Math.sin((2 * Math.PI * k) / 40) }));
    expect(worstRelativeError(want, polyRoots(p))).toBeLessThan(1e-12);
  });

  it('handles 20 lightly damped modes from 1 to 1e4 rad/s', () => {
    let p = [1];
    const want: Complex[] = [];
    for (let k = 0; k < 20; k++) {
      const wn = 10 ** ((4 * k) / 19);
      const z = 0.01 + 0.02 * (k % 5);
      p = polyMul(p, [wn * wn, 2 * z * wn, 1]);
      const re = -z * wn;
      const im = wn * Math.sqrt(1 - z * z);
      want.push({ re, im }, { re, im: -im });
    }
    expect(worstRelativeError(want, polyRoots(p))).toBeLessThan(1e-8);
  });

  it('is invariant to the scale of the coefficients (1e-15 .. 1e15)', () => {
    const p = fromRealRoots([-0.5, -3, -70]);
    for (const k of [1e-15, 1, 1e15]) {
      const got = polyRoots(p.map((c) => c * k)).map((r) => r.re).sort((a, b) => a - b);
      expect(got[0]).toBeCloseTo(-70, 10);
      expect(got[2]).toBeCloseTo(-0.5, 12);
    }
  });

  it('refuses the zero polynomial and gives no roots for a constant', () => {
    expect(() => polyRoots([0])).toThrow();
    expect(polyRoots([3])).toEqual([]);
  });
});
