import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import type { Complex, Poly } from '../model/tf.js';
import { hessenbergEigenvalues } from './hessenberg-qr.js';
import { polyTrim, polyEvalComplexWithDerivative } from './poly.js';

/**
 * Polynomial roots as eigenvalues of the companion matrix.
 *
 * The companion matrix is already upper Hessenberg, so its eigenvalues come from
 * the Francis double-shift QR iteration on it directly (hessenberg-qr.ts), with no
 * reduction and no Schur vectors; ml-matrix's general nonsymmetric solver (a
 * maintained general-purpose library) stands by for the rare matrix on which that
 * does not converge. The companion matrix is badly scaled whenever the roots span
 * decades, so we (1) strip exact zero roots, (2) scale the variable by a power of
 * two so the root magnitudes centre on 1, and (3) balance the matrix by diagonal
 * powers-of-two scaling before the QR iteration. Without (3) results become
 * useless from degree ~25 up. A guarded Newton step on the scaled polynomial then
 * polishes each root.
 */

const RADIX = 2;

/** Balances a square matrix (row-major, n x n) in place by diagonal similarity with powers of two (row/column norm equalisation); a Hessenberg matrix stays Hessenberg. */
function balance(a: Float64Array, n: number): void {
  const sqrdx = RADIX * RADIX;
  let done = false;
  for (let sweep = 0; !done && sweep < 100; sweep++) {
    done = true;
    for (let i = 0; i < n; i++) {
      let r = 0;
      let c = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        c += Math.abs(a[j * n + i]!);
        r += Math.abs(a[i * n + j]!);
      }
      if (c === 0 || r === 0) continue;
      let g = r / RADIX;
      let f = 1;
      const s = c + r;
      while (c < g) { f *= RADIX; c *= sqrdx; }
      g = r * RADIX;
      while (c > g) { f /= RADIX; c /= sqrdx; }
      if ((c + r) / f < 0.95 * s) {
        done = false;
        const gi = 1 / f;
        for (let j = 0; j < n; j++) a[i * n + j]! *= gi;
        for (let j = 0; j < n; j++) a[j * n + i]! *= f;
      }
    }
  }
}

/** A few Newton steps on p, kept only while |p| shrinks and the step stays small next to the neighbouring roots. */
function polish(p: readonly number[], z: Complex, neighbourDist: number): Complex {
  let re = z.re;
  let im = z.im;
  let [vr, vi, dr, di] = polyEvalComplexWithDerivative(p, re, im);
  let mag = Math.hypot(vr, vi);
  for (let it = 0; it < 4 && mag > 0; it++) {
    const den = dr * dr + di * di;
    if (den === 0) break;
    const sr = (vr * dr + vi * di) / den;
    const si = (vi * dr - vr * di) / den;
    // A step comparable to the distance to the next root means we sit in a cluster: leave it.
    if (Math.hypot(sr, si) > 0.1 * neighbourDist) break;
    const nr = re - sr;
    const ni = im === 0 ? 0 : im - si;
    const next = polyEvalComplexWithDerivative(p, nr, ni);
    const nmag = Math.hypot(next[0], next[1]);
    if (!(nmag < mag)) break;
    re = nr; im = ni; [vr, vi, dr, di] = next; mag = nmag;
  }
  return { re, im };
}

/** Eigenvalues of a balanced companion matrix (row-major, n x n): the Hessenberg QR iteration, else the general eigen solver. */
function companionEigenvalues(a: Float64Array, n: number): Complex[] {
  const e = hessenbergEigenvalues(Float64Array.from(a), n);
  if (e !== null && e.re.every(Number.isFinite) && e.im.every(Number.isFinite)) return Array.from(e.re, (re, i) => ({ re, im: e.im[i]! }));
  // Not converged: the general solver (Hessenberg reduction, shifted QR with vectors) is slower but shifts differently.
  const rows = Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, (i + 1) * n)));
  const evd = new EigenvalueDecomposition(new Matrix(rows), { assumeSymmetric: false });
  return evd.realEigenvalues.map((re, i) => ({ re, im: evd.imaginaryEigenvalues[i]! }));
}

/** Roots of a monic-normalised polynomial q (ascending, q[0] != 0, degree >= 3) via the balanced companion matrix. */
function companionRoots(q: readonly number[]): Complex[] {
  const n = q.length - 1;
  const lead = q[n]!;
  // Upper Hessenberg companion: first row holds -q[n-1..0]/lead, ones on the subdiagonal.
  const a = new Float64Array(n * n);
  for (let j = 0; j < n; j++) a[j] = -q[n - 1 - j]! / lead;
  for (let i = 1; i < n; i++) a[i * n + i - 1] = 1;
  balance(a, n);
  const raw = companionEigenvalues(a, n);
  // Polish the upper half-plane and real roots, mirror the rest so pairs stay exact conjugates.
  const out: Complex[] = [];
  for (let i = 0; i < raw.length; i++) {
    const z = raw[i]!;
    if (z.im < 0) continue;
    let dist = Infinity;
    for (let j = 0; j < raw.length; j++) {
      if (j !== i) dist = Math.min(dist, Math.hypot(raw[j]!.re - z.re, raw[j]!.im - z.im));
    }
    const w = polish(q, z, dist);
    out.push(w);
    if (w.im !== 0) out.push({ re: w.re, im: -w.im });
  }
  return out.length === n ? out : raw;
}

/** Roots of a quadratic c0 + c1 x + c2 x^2 without cancellation. */
function quadraticRoots(c0: number, c1: number, c2: number): Complex[] {
  const disc = c1 * c1 - 4 * c2 * c0;
  if (disc >= 0) {
    const q = -0.5 * (c1 + Math.sign(c1 || 1) * Math.sqrt(disc));
    const r1 = q / c2;
    const r2 = q === 0 ? 0 : c0 / q;
    return [{ re: r1, im: 0 }, { re: r2, im: 0 }];
  }
  const re = -c1 / (2 * c2);
  const im = Math.sqrt(-disc) / (2 * Math.abs(c2));
  return [{ re, im }, { re, im: -im }];
}

/** All complex roots of p (ascending coefficients), with multiplicity; zero roots are exact. Throws on the zero polynomial. */
export function polyRoots(p: Poly): Complex[] {
  const t = polyTrim(p);
  if (t.length === 1) {
    if (t[0] === 0) throw new Error('polyRoots: the zero polynomial has no finite root set');
    return [];
  }
  let z = 0;
  while (t[z] === 0) z++;
  const zeros: Complex[] = Array.from({ length: z }, () => ({ re: 0, im: 0 }));
  const core = t.slice(z);
  const n = core.length - 1;
  if (n === 0) return zeros;
  // Scale x = c y with c a power of two near the geometric mean of root magnitudes |c0/cn|^(1/n).
  const lead = core[n]!;
  const c = 2 ** Math.round(Math.log2(Math.abs(core[0]! / lead)) / n);
  const q = core.map((a, k) => (a / lead) * c ** (k - n));
  let scaled: Complex[];
  if (n === 1) scaled = [{ re: -q[0]! / q[1]!, im: 0 }];
  else if (n === 2) scaled = quadraticRoots(q[0]!, q[1]!, q[2]!);
  else scaled = companionRoots(q);
  return zeros.concat(scaled.map((r) => ({ re: r.re * c, im: r.im * c })));
}
