import type { Complex, TransferFunction } from '../model/tf.js';
import { polyAdd, polyDerivative, polyMul, polyScale } from './poly.js';

/**
 * How much each closed-loop mode contributes to the unit-step response y and effort u,
 * for planning the simulation (step-plan.ts).
 *
 * A simple pole p adds r e^(pt), r the residue of Y(s)/s at p. The residue formula
 * N(p) e^(-pT) / (p Delta'(p)) is only valid at a simple pole: at a repeated one Delta'(p)
 * is zero, and where a zero cancels such a pole (C P = (s+1)/(s(s+1)): Delta = (s+1)^2)
 * it is even 0/0. A root finder also returns a k-fold root split by about eps^(1/k), which
 * makes the single residues huge and of opposite signs, and with a delay the listed poles
 * are estimates (near-multiple roots are listed once). So poles that lie close together
 * form a cluster (a lone pole is a cluster of one), and the cluster's contribution
 *   (1/2 pi i) \oint Y(s)/s e^(st) ds = e^(ct) sum_j b_j t^(j-1) / (j-1)!
 * is taken from the Laurent coefficients b_j of Y(s)/s about the cluster centre c, found
 * by the trapezoidal rule on a circle around the cluster. The circle keeps its distance
 * from the roots, so nothing there divides by a near-zero, and a cancelled pole simply
 * gets b_j = 0. A lone listed pole that is a clean simple root (checked, see simpleResidues)
 * skips the circle: there the residue formula is exact and some twenty times cheaper.
 */

/** One term |amp| t^power / power! e^((Re p + spread) t) bounding part of the response. */
export interface Mode {
  /** The pole, or the centre of a cluster of poles. */
  readonly p: Complex;
  /** Power of t (a k-fold pole gives powers 0 .. k-1). */
  readonly power: number;
  /** Radius of the cluster around p (0 for a lone pole): its terms may decay that much slower. */
  readonly spread: number;
  readonly yAmp: number;
  readonly uAmp: number;
}

/** Poles closer than this, relative to their size, form one cluster (a 7-fold root comes back split by ~1e-2). */
const CLUSTER_REL = 0.05;
/**
 * Nodes of the trapezoidal rule on the circle. Its error in b_j falls like (spread / r)^NODES
 * from inside and (r / room)^(NODES - j) from outside, where it is multiplied by room^j: with
 * a cluster at 1000 rad/s, 32 nodes left spurious t^3 terms big enough to stretch the run.
 */
const NODES = 64;
/** The circle's radius, as a fraction of the distance to the nearest outside pole (or the origin) ... */
const CIRCLE_AT = 0.3;
/** ... and at least this multiple of the cluster's own radius, which must be at most CLUSTER_INSIDE of that distance. */
const CIRCLE_OVER_SPREAD = 2;
const CLUSTER_INSIDE = 0.2;
/**
 * Laurent terms beyond the number of listed poles: a pole list may hold a near-multiple
 * root once (delay roots are deduplicated), and the circle then still finds its t^k terms.
 */
const EXTRA_TERMS = 2;
const MAX_TERMS = 10;
/** Coefficients below this fraction of max|F| r^j are rounding noise in the samples of F, not a mode. */
const NOISE = 1e-10;

const dist = (a: Complex, b: Complex) => Math.hypot(a.re - b.re, a.im - b.im);
const norm = (re: number, im: number) => Math.sqrt(re * re + im * im);

/**
 * The loop's polynomials, Delta(s) = D + N e^(-sT), Y/s = N e^(-sT) / (s Delta), U/s = Nu / (s Delta),
 * and N' - T N and D' for Delta'. Float64Arrays because every mode evaluates them many times.
 */
interface LoopPolys {
  readonly n: Float64Array;
  readonly d: Float64Array;
  readonly nu: Float64Array;
  readonly dn: Float64Array;
  readonly dd: Float64Array;
  readonly delayS: number;
}

/** Horner's rule at re + j im: the value lands in hr, hi and sum |a_k| |s|^k in habs (no allocation on this hot path). */
let hr = 0, hi = 0, habs = 0;
function horner(a: Float64Array, re: number, im: number): void {
  let vr = 0, vi = 0, va = 0;
  const m = norm(re, im);
  for (let k = a.length - 1; k >= 0; k--) {
    const nr = vr * re - vi * im + a[k]!;
    vi = vr * im + vi * re;
    vr = nr;
    va = va * m + Math.abs(a[k]!);
  }
  hr = vr; hi = vi; habs = va;
}

/** Unit roots of the trapezoidal rule: the nodes are c + r (COS[m] + j SIN[m]), and z_m^j = r^j w^(m j mod NODES). */
const COS = new Float64Array(NODES);
const SIN = new Float64Array(NODES);
for (let m = 0; m < NODES; m++) { COS[m] = Math.cos((2 * Math.PI * m) / NODES); SIN[m] = Math.sin((2 * Math.PI * m) / NODES); }
/** Samples of Y/s and U/s on the circle, reused by every cluster (re, im interleaved). */
const FY = new Float64Array(2 * NODES);
const FU = new Float64Array(2 * NODES);

/**
 * A listed pole gets the classic residue only where that formula means what it says: its
 * point is a root (a Newton step from it stays within ROOT_TOL of the room around it) and a
 * simple, well-conditioned one (|p Delta'(p)| at least CONDITION times the sum of the sizes
 * of the terms of Delta at p: a double root refined to rounding, or two delay roots merged
 * as one, stays orders of magnitude below).
 */
const ROOT_TOL = 1e-6;
const CONDITION = 1e-4;

/**
 * Sizes of the residues of Y/s and U/s at p by the classic formula N(p) e^(-pT) / (p Delta'(p)),
 * and whether p is a clean simple root for it; room is the distance to the nearest other pole.
 */
function simpleResidues(lp: LoopPolys, p: Complex, room: number): { y: number; u: number; clean: boolean } {
  const mag = Math.exp(-p.re * lp.delayS);
  const er = lp.delayS > 0 ? mag * Math.cos(-p.im * lp.delayS) : 1;
  const ei = lp.delayS > 0 ? mag * Math.sin(-p.im * lp.delayS) : 0;
  horner(lp.n, p.re, p.im);
  const nr = hr * er - hi * ei, ni = hr * ei + hi * er, nAbs = habs * mag;
  horner(lp.d, p.re, p.im);
  const deltaAbs = norm(hr + nr, hi + ni), scale = habs + nAbs;
  horner(lp.dn, p.re, p.im);
  // Delta' = D' + (N' - T N) e^(-sT), times p.
  const gr = hr * er - hi * ei, gi = hr * ei + hi * er;
  horner(lp.dd, p.re, p.im);
  const ddr = hr + gr, ddi = hi + gi;
  const qAbs = norm(p.re * ddr - p.im * ddi, p.re * ddi + p.im * ddr);
  horner(lp.nu, p.re, p.im);
  const y = norm(nr, ni) / qAbs, u = norm(hr, hi) / qAbs;
  // The Newton step |Delta / Delta'| is |p Delta| / |p Delta'|.
  const clean = qAbs >= CONDITION * scale && norm(p.re, p.im) * deltaAbs <= ROOT_TOL * room * qAbs && Number.isFinite(y) && Number.isFinite(u);
  return { y, u, clean };
}

/** Sizes |b_1|..|b_k| of the Laurent coefficients of Y/s and U/s about c, by the trapezoidal rule on the circle |s - c| = r. */
function laurent(lp: LoopPolys, c: Complex, r: number, k: number): { y: number[]; u: number[] } {
  let maxY = 0, maxU = 0;
  for (let m = 0; m < NODES; m++) {
    const sr = c.re + r * COS[m]!, si = c.im + r * SIN[m]!;
    let er = 1, ei = 0;
    if (lp.delayS > 0) {
      const mag = Math.exp(-sr * lp.delayS);
      er = mag * Math.cos(-si * lp.delayS); ei = mag * Math.sin(-si * lp.delayS);
    }
    horner(lp.n, sr, si);
    const ner = hr * er - hi * ei, nei = hr * ei + hi * er;
    horner(lp.d, sr, si);
    const ar = hr + ner, ai = hi + nei;
    // 1 / (s Delta).
    const qr = sr * ar - si * ai, qi = sr * ai + si * ar;
    const q2 = qr * qr + qi * qi;
    const ir = qr / q2, ii = -qi / q2;
    FY[2 * m] = ner * ir - nei * ii; FY[2 * m + 1] = ner * ii + nei * ir;
    horner(lp.nu, sr, si);
    FU[2 * m] = hr * ir - hi * ii; FU[2 * m + 1] = hr * ii + hi * ir;
    maxY = Math.max(maxY, norm(FY[2 * m]!, FY[2 * m + 1]!));
    maxU = Math.max(maxU, norm(FU[2 * m]!, FU[2 * m + 1]!));
  }
  const y: number[] = [], u: number[] = [];
  for (let j = 1, rj = r; j <= k; j++, rj *= r) {
    // b_j = (r^j / NODES) sum F(s_m) w^(m j).
    let yr = 0, yi = 0, ur = 0, ui = 0;
    for (let m = 0; m < NODES; m++) {
      const idx = (m * j) % NODES, wr = COS[idx]!, wi = SIN[idx]!;
      yr += FY[2 * m]! * wr - FY[2 * m + 1]! * wi; yi += FY[2 * m]! * wi + FY[2 * m + 1]! * wr;
      ur += FU[2 * m]! * wr - FU[2 * m + 1]! * wi; ui += FU[2 * m]! * wi + FU[2 * m + 1]! * wr;
    }
    // Coefficients at rounding-noise level are no mode.
    const by = (norm(yr, yi) * rj) / NODES, bu = (norm(ur, ui) * rj) / NODES;
    y.push(by <= NOISE * maxY * rj ? 0 : by);
    u.push(bu <= NOISE * maxU * rj ? 0 : bu);
  }
  return { y, u };
}

/** Groups poles by single linkage at CLUSTER_REL (indices into poles). */
function clusters(poles: readonly Complex[]): number[][] {
  const parent = poles.map((_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) i = parent[i] = parent[parent[i]!]!;
    return i;
  };
  for (let i = 0; i < poles.length; i++) {
    for (let j = i + 1; j < poles.length; j++) {
      const scale = Math.max(Math.hypot(poles[i]!.re, poles[i]!.im), Math.hypot(poles[j]!.re, poles[j]!.im));
      if (dist(poles[i]!, poles[j]!) <= CLUSTER_REL * scale) parent[find(i)] = find(j);
    }
  }
  const groups = new Map<number, number[]>();
  poles.forEach((_, i) => {
    const root = find(i);
    groups.set(root, [...(groups.get(root) ?? []), i]);
  });
  return [...groups.values()];
}

/** A circle for the cluster's Laurent coefficients, growing the cluster over neighbours that crowd it; null if none fits. */
function clusterCircle(poles: readonly Complex[], members: number[], delayS: number): { c: Complex; spread: number; r: number; room: number; members: number[] } | null {
  const inside = new Set(members);
  // Each pass either returns or takes in one more pole: at most poles.length passes.
  for (let pass = 0; pass <= poles.length; pass++) {
    const c = { re: 0, im: 0 };
    for (const i of inside) { c.re += poles[i]!.re / inside.size; c.im += poles[i]!.im / inside.size; }
    let spread = 0;
    for (const i of inside) spread = Math.max(spread, dist(poles[i]!, c));
    // Y/s has a pole at 0 (the final value), and with a delay unlisted poles about 2 pi / T apart.
    let room = Math.min(Math.hypot(c.re, c.im), delayS > 0 ? 2 / delayS : Infinity);
    let nearest = -1;
    poles.forEach((q, i) => {
      if (inside.has(i)) return;
      const d = dist(q, c);
      if (d < room) { room = d; nearest = i; }
    });
    if (spread <= CLUSTER_INSIDE * room) return { c, spread, r: Math.max(CIRCLE_AT * room, CIRCLE_OVER_SPREAD * spread), room, members: [...inside] };
    if (nearest < 0) return null;
    inside.add(nearest);
  }
  return null;
}

/**
 * Envelope terms of every closed-loop mode in Y/s and U/s for the loop with characteristic
 * function Delta(s) = Dc Dp + Nc Np e^(-sT). A cluster of k listed poles (k = 1 for a lone
 * one) gives powers 0 .. k + 1 from a circle around it, which also counts what the list
 * placed a little off or merged (with a delay the poles are estimates). Where no circle
 * fits, the poles fall back to single residues (possibly infinite: the planner caps them
 * and warns).
 */
export function loopModes(plant: TransferFunction, comp: TransferFunction, poles: readonly Complex[]): Mode[] {
  const n = polyMul(comp.num, plant.num);
  const d = polyMul(comp.den, plant.den);
  const delayS = plant.delayS + comp.delayS;
  const lp: LoopPolys = {
    n: Float64Array.from(n),
    d: Float64Array.from(d),
    nu: Float64Array.from(polyMul(comp.num, plant.den)),
    dn: Float64Array.from(polyAdd(polyDerivative(n), polyScale(n, -delayS))),
    dd: Float64Array.from(polyDerivative(d)),
    delayS,
  };
  const ps = poles.filter((p) => Number.isFinite(p.re) && Number.isFinite(p.im));
  const amp = (a: number) => (Number.isFinite(a) ? a : Infinity);
  const modes: Mode[] = [];
  const done = new Set<number>();
  for (const group of clusters(ps)) {
    if (group.every((i) => done.has(i))) continue;
    const circle = clusterCircle(ps, group, lp.delayS);
    if (circle && circle.members.every((i) => !done.has(i))) {
      circle.members.forEach((i) => done.add(i));
      if (circle.members.length === 1) {
        // A lone clean simple root needs no circle: its residue is the whole mode.
        const p = ps[circle.members[0]!]!;
        const r = simpleResidues(lp, p, circle.room);
        if (r.clean) {
          modes.push({ p, power: 0, spread: 0, yAmp: r.y, uAmp: r.u });
          continue;
        }
      }
      const b = laurent(lp, circle.c, circle.r, Math.min(circle.members.length + EXTRA_TERMS, MAX_TERMS));
      b.y.forEach((by, j) => modes.push({ p: circle.c, power: j, spread: circle.spread, yAmp: amp(by), uAmp: amp(b.u[j]!) }));
      continue;
    }
    for (const i of group) {
      if (done.has(i)) continue;
      done.add(i);
      const r = simpleResidues(lp, ps[i]!, 0);
      modes.push({ p: ps[i]!, power: 0, spread: 0, yAmp: amp(r.y), uAmp: amp(r.u) });
    }
  }
  return modes;
}
