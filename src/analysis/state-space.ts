import type { Complex, Poly } from '../model/tf.js';
import { polyTrim } from './poly.js';
import { polyRoots } from './roots.js';

/**
 * Single-input single-output state-space models x' = A x + B u, y = C x + D u, and a
 * well-conditioned realisation of a proper rational function.
 *
 * Why a cascade of first- and second-order sections built from poles and zeros, not a
 * companion form: the companion matrix of a polynomial whose roots span decades has
 * entries spanning many more, its exponential suffers cancellation, and the realised
 * poles move with every rounding. Here each section carries only its own pole pair
 * (complex pairs as the normal block [[re, im], [-im, re]]), each zero sits in the
 * section of the pole nearest to it in log-magnitude, so the entries of A are of the
 * size of the poles themselves and the step simulator sees the model as it was given.
 */

/** x' = A x + B u, y = C x + D u with n states; A is row-major n x n. */
export interface StateSpace {
  readonly n: number;
  readonly a: Float64Array;
  readonly b: Float64Array;
  readonly c: Float64Array;
  readonly d: number;
  /** The roots of the denominator the model was built from (its poles, with multiplicity). */
  readonly poles: readonly Complex[];
}

interface Section {
  /** One real pole, two real poles, or one complex pair (re, +im). */
  poles: Complex[];
  zeros: Complex[];
}

const logMag = (z: Complex) => Math.log(Math.hypot(z.re, z.im) + 1e-300);

/** Splits roots into real ones and one representative (im > 0) per conjugate pair. */
function splitRoots(roots: readonly Complex[]): { real: Complex[]; pairs: Complex[] } {
  const real: Complex[] = [];
  const pairs: Complex[] = [];
  for (const r of roots) {
    if (r.im === 0) real.push(r);
    else if (r.im > 0) pairs.push(r);
  }
  return { real, pairs };
}

/** Groups poles into sections and gives each zero a place near its pole (capacity = section order). */
function pairSections(poles: readonly Complex[], zeros: readonly Complex[]): Section[] {
  const p = splitRoots(poles);
  const z = splitRoots(zeros);
  const sections: Section[] = [
    ...p.pairs.map((q) => ({ poles: [q], zeros: [] as Complex[] })),
    ...p.real.map((q) => ({ poles: [q], zeros: [] as Complex[] })),
  ];
  const order = (s: Section) => (s.poles.length === 1 && s.poles[0]!.im !== 0 ? 2 : s.poles.length);
  const dist = (s: Section, w: Complex) => Math.min(...s.poles.map((q) => Math.abs(logMag(q) - logMag(w))));
  // Complex zero pairs first: they need a section of order two.
  for (const w of z.pairs) {
    let best: Section | undefined;
    for (const s of sections) {
      if (order(s) === 2 && s.zeros.length === 0 && (!best || dist(s, w) < dist(best, w))) best = s;
    }
    if (!best) {
      // Merge the two real single-pole sections nearest to this zero pair.
      const singles = sections.filter((s) => order(s) === 1 && s.zeros.length === 0).sort((x, y) => dist(x, w) - dist(y, w));
      const [s1, s2] = singles;
      if (!s1 || !s2) throw new Error('state-space: improper rational function');
      s1.poles.push(s2.poles[0]!);
      sections.splice(sections.indexOf(s2), 1);
      best = s1;
    }
    best.zeros.push(w, { re: w.re, im: -w.im });
  }
  for (const w of z.real) {
    let best: Section | undefined;
    for (const s of sections) {
      if (s.zeros.length < order(s) && (!best || dist(s, w) < dist(best, w))) best = s;
    }
    if (!best) throw new Error('state-space: improper rational function');
    best.zeros.push(w);
  }
  return sections;
}

/** Monic polynomial (descending helper) from up to two roots: returns [c0, c1, c2] of prod (s - r). */
function monic(roots: readonly Complex[]): [number, number, number] {
  if (roots.length === 0) return [1, 0, 0];
  if (roots.length === 1) return [-roots[0]!.re, 1, 0];
  const [r1, r2] = roots as [Complex, Complex];
  if (r1.im !== 0) return [r1.re * r1.re + r1.im * r1.im, -2 * r1.re, 1];
  return [r1.re * r2.re, -(r1.re + r2.re), 1];
}

interface Block { n: number; a: number[]; b: number[]; c: number[]; d: number }

/** Realises one section (poles and zeros as given, unit leading coefficients). */
function realiseSection(s: Section): Block {
  const [n0, n1, n2] = monic(s.zeros);
  if (s.poles.length === 1 && s.poles[0]!.im === 0) {
    const p = s.poles[0]!.re;
    // (n1 s + n0)/(s - p) = n1 + (n0 + n1 p)/(s - p).
    const r = n0 + n1 * p;
    const g = Math.sqrt(Math.abs(r)) || 1;
    return { n: 1, a: [p], b: [g], c: [r / g], d: n1 };
  }
  const [a0, a1] = monic(s.poles.length === 1 ? [s.poles[0]!, { re: s.poles[0]!.re, im: -s.poles[0]!.im }] : s.poles);
  const r1 = n1 - n2 * a1;
  const r0 = n0 - n2 * a0;
  if (s.poles.length === 1) {
    const { re: sig, im: beta } = s.poles[0]!;
    // States rotate as e^(sig t) [cos, sin]: B = [0, g] gives (c1 beta g + c2 g (s - sig)) / den.
    const c1g = (r0 + r1 * sig) / beta;
    const g = Math.sqrt(Math.hypot(c1g, r1)) || 1;
    return { n: 2, a: [sig, beta, -beta, sig], b: [0, g], c: [c1g / g, r1 / g], d: n2 };
  }
  const [p1, p2] = [s.poles[0]!.re, s.poles[1]!.re];
  // Chain x1 = g/(s - p1) u, x2 = k x1/(s - p2); k of the size of the poles keeps both states alike.
  const k = Math.sqrt(Math.abs(p1 * p2)) || Math.max(Math.abs(p1), Math.abs(p2)) || 1;
  // y = c1 x1 + c2 x2 = g (c1 (s - p2) + c2 k) / den.
  const c1g = r1;
  const c2kg = r0 + r1 * p2;
  const g = Math.sqrt(Math.hypot(c1g, c2kg / k)) || 1;
  return { n: 2, a: [p1, 0, k, p2], b: [g, 0], c: [c1g / g, c2kg / (k * g)], d: n2 };
}

/** A well-conditioned realisation of num/den (ascending coefficients; must be proper). */
export function realiseProper(num: Poly, den: Poly): StateSpace {
  const nt = polyTrim(num);
  const dt = polyTrim(den);
  if (nt.length > dt.length) throw new Error('state-space: improper rational function');
  const lead = dt[dt.length - 1]!;
  if (nt.length === 1 && nt[0] === 0) return { n: 0, a: new Float64Array(0), b: new Float64Array(0), c: new Float64Array(0), d: 0, poles: [] };
  const gain = nt[nt.length - 1]! / lead;
  const poles = polyRoots(dt);
  const blocks = pairSections(poles, polyRoots(nt)).map(realiseSection);
  const n = blocks.reduce((acc, bl) => acc + bl.n, 0);
  const a = new Float64Array(n * n);
  const b = new Float64Array(n);
  // The running output of the cascade so far, as a row over the states plus feedthrough.
  let row = new Float64Array(n);
  let dd = 1;
  let off = 0;
  for (const bl of blocks) {
    for (let i = 0; i < bl.n; i++) {
      for (let j = 0; j < bl.n; j++) a[(off + i) * n + off + j] = bl.a[i * bl.n + j]!;
      for (let j = 0; j < off; j++) a[(off + i) * n + j] = bl.b[i]! * row[j]!;
      b[off + i] = bl.b[i]! * dd;
    }
    const next = new Float64Array(n);
    for (let j = 0; j < off; j++) next[j] = bl.d * row[j]!;
    for (let i = 0; i < bl.n; i++) next[off + i] = bl.c[i]!;
    row = next;
    dd *= bl.d;
    off += bl.n;
  }
  for (let j = 0; j < n; j++) row[j] = row[j]! * gain;
  return { n, a, b, c: row, d: dd * gain, poles };
}
