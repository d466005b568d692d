import type { Poly } from '../model/tf.js';

/**
 * Real polynomials in ascending powers (p[k] multiplies s^k). Small pure helpers;
 * roots live in roots.ts.
 */

/** Drops trailing (highest-power) exact zeros; the zero polynomial is [0]. */
export function polyTrim(p: Poly): number[] {
  let n = p.length;
  while (n > 1 && p[n - 1] === 0) n--;
  return n === 0 ? [0] : p.slice(0, n);
}

/** Degree after trimming; the zero polynomial has degree -Infinity. */
export function polyDegree(p: Poly): number {
  const t = polyTrim(p);
  return t.length === 1 && t[0] === 0 ? -Infinity : t.length - 1;
}

/** True for the zero polynomial. */
export function polyIsZero(p: Poly): boolean {
  return p.every((c) => c === 0);
}

/** a + b */
export function polyAdd(a: Poly, b: Poly): number[] {
  const n = Math.max(a.length, b.length);
  const r = new Array<number>(n);
  for (let k = 0; k < n; k++) r[k] = (a[k] ?? 0) + (b[k] ?? 0);
  return polyTrim(r);
}

/** a - b */
export function polySub(a: Poly, b: Poly): number[] {
  return polyAdd(a, polyScale(b, -1));
}

/** k * a */
export function polyScale(a: Poly, k: number): number[] {
  return polyTrim(a.map((c) => c * k));
}

/** a * b */
export function polyMul(a: Poly, b: Poly): number[] {
  const r = new Array<number>(a.length + b.length - 1).fill(0);
  for (let i = 0; i < a.length; i++) {
    const ai = a[i]!;
    if (ai === 0) continue;
    for (let j = 0; j < b.length; j++) r[i + j] += ai * b[j]!;
  }
  return polyTrim(r);
}

/** a^n for a whole n >= 0. */
export function polyPow(a: Poly, n: number): number[] {
  let r: number[] = [1];
  for (let i = 0; i < n; i++) r = polyMul(r, a);
  return r;
}

/** d/ds a */
export function polyDerivative(a: Poly): number[] {
  if (a.length <= 1) return [0];
  return polyTrim(a.slice(1).map((c, k) => c * (k + 1)));
}

/** a(re + j im) as [re, im] (Horner in complex arithmetic). */
export function polyEvalComplex(a: Poly, re: number, im: number): [number, number] {
  let rr = 0;
  let ri = 0;
  for (let k = a.length - 1; k >= 0; k--) {
    const nr = rr * re - ri * im + a[k]!;
    ri = rr * im + ri * re;
    rr = nr;
  }
  return [rr, ri];
}

/** a(re + j im) and a'(re + j im) together (complex Horner): [value re, value im, derivative re, derivative im]. */
export function polyEvalComplexWithDerivative(a: Poly, re: number, im: number): [number, number, number, number] {
  let vr = 0, vi = 0, dr = 0, di = 0;
  for (let k = a.length - 1; k >= 0; k--) {
    const ndr = dr * re - di * im + vr;
    di = dr * im + di * re + vi;
    dr = ndr;
    const nvr = vr * re - vi * im + a[k]!;
    vi = vr * im + vi * re;
    vr = nvr;
  }
  return [vr, vi, dr, di];
}

/** a(jw) as [re, im]; cheaper than the general complex case. */
export function polyEvalJw(a: Poly, w: number): [number, number] {
  // s^k at s = jw cycles through 1, j, -1, -j times w^k.
  let re = 0;
  let im = 0;
  let wk = 1;
  for (let k = 0; k < a.length; k++) {
    const c = a[k]! * wk;
    switch (k & 3) {
      case 0: re += c; break;
      case 1: im += c; break;
      case 2: re -= c; break;
      default: im -= c;
    }
    wk *= w;
  }
  return [re, im];
}

/** p(c s): the polynomial with its variable scaled, used to move frequencies near 1 before root finding. */
export function polyScaleVariable(p: Poly, c: number): number[] {
  let ck = 1;
  return p.map((a) => {
    const r = a * ck;
    ck *= c;
    return r;
  });
}
