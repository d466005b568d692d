import { describe, expect, it } from 'vitest';
import { hessenbergEigenvalues } from '../../src/analysis/hessenberg-qr.js';

// Matrices whose eigenvalues are known in closed form.

/** Tridiagonal Toeplitz matrix tridiag(b, a, c) (row-major): upper Hessenberg. */
function tridiagonal(n: number, a: number, b: number, c: number): Float64Array {
  const h = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    h[i * n + i] = a;
    if (i > 0) h[i * n + i - 1] = b;
    if (i + 1 < n) h[i * n + i + 1] = c;
  }
  return h;
}

/** Sorted "re,im" pairs rounded to `digits`, for comparing eigenvalue sets. */
const key = (re: ArrayLike<number>, im: ArrayLike<number>, digits: number) => {
  const fmt = (x: number) => (Math.abs(x) < 10 ** -digits ? 0 : x).toFixed(digits);
  return Array.from(re, (r, i) => `${fmt(r)},${fmt(im[i]!)}`).sort();
};

describe('hessenbergEigenvalues', () => {
  it('tridiag(b, a, c) with bc > 0: a + 2 sqrt(bc) cos(k pi/(n+1)), k = 1..n (substitute the eigenvector v_j = (b/c)^(j/2) sin(j k pi/(n+1)))', () => {
    const n = 12;
    const [a, b, c] = [3, 2, 0.5];
    const e = hessenbergEigenvalues(tridiagonal(n, a, b, c), n)!;
    const want = Array.from({ length: n }, (_, k) => a + 2 * Math.sqrt(b * c) * Math.cos(((k + 1) * Math.PI) / (n + 1)));
    expect(key(e.re, e.im, 10)).toStrictEqual(key(want, new Array(n).fill(0), 10));
  });

  it('tridiag(b, a, c) with bc < 0: complex pairs a +- 2 i sqrt(|bc|) cos(k pi/(n+1))', () => {
    const n = 9;
    const [a, b, c] = [-1, 4, -0.25];
    const e = hessenbergEigenvalues(tridiagonal(n, a, b, c), n)!;
    const im = Array.from({ length: n }, (_, k) => 2 * Math.sqrt(-b * c) * Math.cos(((k + 1) * Math.PI) / (n + 1)));
    expect(key(e.re, e.im, 10)).toStrictEqual(key(new Array(n).fill(a), im, 10));
  });

  it('the cyclic shift (companion matrix of s^8 - 1), where plain shifts stall: the 8th roots of unity', () => {
    const n = 8;
    const h = new Float64Array(n * n);
    h[n - 1] = 1; // first row: coefficients of s^8 - 1
    for (let i = 1; i < n; i++) h[i * n + i - 1] = 1;
    const e = hessenbergEigenvalues(h, n)!;
    const want = Array.from({ length: n }, (_, k) => [Math.cos((2 * Math.PI * k) / n), Math.sin((2 * Math.PI * k) / n)]);
    expect(key(e.re, e.im, 9)).toStrictEqual(key(want.map((w) => w[0]!), want.map((w) => w[1]!), 9));
  });

  it('a 1x1 and a 2x2 block need no iteration', () => {
    expect(Array.from(hessenbergEigenvalues(Float64Array.of(-7), 1)!.re)).toStrictEqual([-7]);
    const e = hessenbergEigenvalues(Float64Array.of(0, 1, -4, 0), 2)!; // s^2 + 4
    expect(key(e.re, e.im, 12)).toStrictEqual(key([0, 0], [2, -2], 12));
  });
});
