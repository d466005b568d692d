import { describe, expect, it } from 'vitest';
import { expm } from '../../src/analysis/expm.js';
import { polyEvalComplex } from '../../src/analysis/poly.js';
import { realiseProper, type StateSpace } from '../../src/analysis/state-space.js';

/** The building blocks of the step simulator against identities that hold exactly. */

describe('expm', () => {
  it('rotation generator: exp([[0, w], [-w, 0]]) = [[cos w, sin w], [-sin w, cos w]]', () => {
    for (const w of [0.3, 7, 61]) {
      const e = expm(new Float64Array([0, w, -w, 0]), 2);
      expect(e[0]).toBeCloseTo(Math.cos(w), 12);
      expect(e[1]).toBeCloseTo(Math.sin(w), 12);
      expect(e[2]).toBeCloseTo(-Math.sin(w), 12);
      expect(e[3]).toBeCloseTo(Math.cos(w), 12);
    }
  });

  it('Jordan block: exp([[a, 1], [0, a]]) = e^a [[1, 1], [0, 1]]', () => {
    const a = -3.7;
    const e = expm(new Float64Array([a, 1, 0, a]), 2);
    const ea = Math.exp(a);
    for (const [got, want] of [[e[0], ea], [e[1], ea], [e[2], 0], [e[3], ea]] as const) expect(Math.abs(got! - want)).toBeLessThan(1e-15);
  });

  it('stiff diagonal: each entry is the scalar exponential to 1e-12 relative', () => {
    // Ten squarings (norm 500) double the rounding error of the scaled exponential ten times: ~2e-13.
    const d = [-1e-3, -2, -500];
    const e = expm(new Float64Array([d[0]!, 0, 0, 0, d[1]!, 0, 0, 0, d[2]!]), 3);
    for (let i = 0; i < 3; i++) expect(Math.abs(e[4 * i]! / Math.exp(d[i]!) - 1)).toBeLessThan(1e-12);
    expect([e[1], e[2], e[3], e[5], e[6], e[7]]).toEqual([0, 0, 0, 0, 0, 0]);
  });
});

/** C (sI - A)^(-1) B + D at complex s, by Gaussian elimination in complex arithmetic. */
function ssEval(m: StateSpace, re: number, im: number): [number, number] {
  const n = m.n;
  const ar: number[][] = [], ai: number[][] = [];
  for (let i = 0; i < n; i++) {
    ar.push([]); ai.push([]);
    for (let j = 0; j < n; j++) {
      ar[i]!.push((i === j ? re : 0) - m.a[i * n + j]!);
      ai[i]!.push(i === j ? im : 0);
    }
    ar[i]!.push(m.b[i]!); ai[i]!.push(0);
  }
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.hypot(ar[r]![c]!, ai[r]![c]!) > Math.hypot(ar[p]![c]!, ai[p]![c]!)) p = r;
    [ar[c], ar[p]] = [ar[p]!, ar[c]!];
    [ai[c], ai[p]] = [ai[p]!, ai[c]!];
    const pr = ar[c]![c]!, pi = ai[c]![c]!, pd = pr * pr + pi * pi;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const xr = ar[r]![c]!, xi = ai[r]![c]!;
      const fr = (xr * pr + xi * pi) / pd, fi = (xi * pr - xr * pi) / pd;
      for (let j = c; j <= n; j++) {
        const vr = ar[c]![j]!, vi = ai[c]![j]!;
        ar[r]![j]! -= fr * vr - fi * vi;
        ai[r]![j]! -= fr * vi + fi * vr;
      }
    }
  }
  let yr = m.d, yi = 0;
  for (let i = 0; i < n; i++) {
    const pr = ar[i]![i]!, pi = ai[i]![i]!, pd = pr * pr + pi * pi;
    const xr = (ar[i]![n]! * pr + ai[i]![n]! * pi) / pd, xi = (ai[i]![n]! * pr - ar[i]![n]! * pi) / pd;
    yr += m.c[i]! * xr;
    yi += m.c[i]! * xi;
  }
  return [yr, yi];
}

function fromRoots(roots: number[], k = 1): number[] {
  let p = [k];
  for (const r of roots) {
    const q = new Array<number>(p.length + 1).fill(0);
    p.forEach((c, i) => { q[i]! += -r * c; q[i + 1]! += c; });
    p = q;
  }
  return p;
}

describe('realiseProper: the sections realise num/den exactly', () => {
  const cases: [string, number[], number[]][] = [
    ['lead with gain', [30, 3], [60, 1]],
    ['complex zeros over real poles (two poles merged)', [9e4, 12, 1], fromRoots([-2, -30, -700])],
    ['repeated poles, zero at the origin', [0, 5], fromRoots([-1, -1, -1])],
    ['resonant plant', [3e4, 200], [9e4, 12, 1]],
    ['poles over five decades', [2e5, 1], fromRoots([-0.1, -3, -80, -2e3, -1e4], 1e-3)],
    ['pure gain', [4], [2]],
    ['biproper with an integrator', [2, 3, 1], [0, 4, 1]],
  ];
  for (const [name, num, den] of cases) {
    it(name, () => {
      const m = realiseProper(num, den);
      expect(m.n).toBe(den.length - 1);
      for (const w of [0.01, 0.7, 13, 450, 2e4]) {
        const [nr, ni] = polyEvalComplex(num, 0.2 * w, w);
        const [dr, di] = polyEvalComplex(den, 0.2 * w, w);
        const dd = dr * dr + di * di;
        const want: [number, number] = [(nr * dr + ni * di) / dd, (ni * dr - nr * di) / dd];
        const got = ssEval(m, 0.2 * w, w);
        const mag = Math.hypot(...want);
        expect(Math.hypot(got[0] - want[0], got[1] - want[1])).toBeLessThan(1e-10 * mag);
      }
    });
  }
});
