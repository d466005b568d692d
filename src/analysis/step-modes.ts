import type { Complex, Poly, TransferFunction } from '../model/tf.js';
import { polyAdd, polyDerivative, polyEvalComplex, polyMul, polyScale } from './poly.js';

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
 * gets b_j = 0.
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

type C = [number, number];

const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
function div(a: C, b: C): C {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
}
const dist = (a: Complex, b: Complex) => Math.hypot(a.re - b.re, a.im - b.im);

/** The loop's polynomials: Delta(s) = D + N e^(-sT), Y/s = N e^(-sT) / (s Delta), U/s = Nu / (s Delta). */
interface LoopPolys {
  readonly n: Poly;
  readonly d: Poly;
  readonly nu: Poly;
  readonly delayS: number;
}

/** e^(-sT) at s. */
function delayFactor(s: Complex, delayS: number): C {
  const mag = Math.exp(-s.re * delayS);
  return [mag * Math.cos(-s.im * delayS), mag * Math.sin(-s.im * delayS)];
}

/** Residues of Y/s and U/s at a simple pole p (the classic formula). */
function simpleResidues(lp: LoopPolys, p: Complex): [C, C] {
  const e = delayFactor(p, lp.delayS);
  // Delta' = D' + (N' - T N) e^(-sT)
  const dd = polyEvalComplex(polyDerivative(lp.d), p.re, p.im);
  const np = polyEvalComplex(polyAdd(polyDerivative(lp.n), polyScale(lp.n, -lp.delayS)), p.re, p.im);
  const ne = mul(np, e);
  const q = mul([p.re, p.im], [dd[0] + ne[0], dd[1] + ne[1]]);
  const y = div(mul(polyEvalComplex(lp.n, p.re, p.im), e), q);
  const u = div(polyEvalComplex(lp.nu, p.re, p.im), q);
  return [y, u];
}

/** Laurent coefficients b_1..b_k of Y/s and U/s about c, by the trapezoidal rule on the circle |s - c| = r. */
function laurent(lp: LoopPolys, c: Complex, r: number, k: number): { y: C[]; u: C[] } {
  const y: C[] = Array.from({ length: k }, () => [0, 0]);
  const u: C[] = Array.from({ length: k }, () => [0, 0]);
  let maxY = 0, maxU = 0;
  for (let m = 0; m < NODES; m++) {
    const th = (2 * Math.PI * m) / NODES;
    const z: C = [r * Math.cos(th), r * Math.sin(th)];
    const s: Complex = { re: c.re + z[0], im: c.im + z[1] };
    const e = delayFactor(s, lp.delayS);
    const nv = polyEvalComplex(lp.n, s.re, s.im);
    const ne = mul(nv, e);
    const dv = polyEvalComplex(lp.d, s.re, s.im);
    const sDelta = mul([s.re, s.im], [dv[0] + ne[0], dv[1] + ne[1]]);
    let fy = div(ne, sDelta);
    let fu = div(polyEvalComplex(lp.nu, s.re, s.im), sDelta);
    maxY = Math.max(maxY, Math.hypot(fy[0], fy[1]));
    maxU = Math.max(maxU, Math.hypot(fu[0], fu[1]));
    // b_j = (1/NODES) sum F(s_m) z_m^j.
    for (let j = 0; j < k; j++) {
      fy = mul(fy, z);
      fu = mul(fu, z);
      y[j]![0] += fy[0] / NODES; y[j]![1] += fy[1] / NODES;
      u[j]![0] += fu[0] / NODES; u[j]![1] += fu[1] / NODES;
    }
  }
  for (let j = 0, rj = r; j < k; j++, rj *= r) {
    if (Math.hypot(...y[j]!) <= NOISE * maxY * rj) y[j] = [0, 0];
    if (Math.hypot(...u[j]!) <= NOISE * maxU * rj) u[j] = [0, 0];
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
function clusterCircle(poles: readonly Complex[], members: number[], delayS: number): { c: Complex; spread: number; r: number; members: number[] } | null {
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
    if (spread <= CLUSTER_INSIDE * room) return { c, spread, r: Math.max(CIRCLE_AT * room, CIRCLE_OVER_SPREAD * spread), members: [...inside] };
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
  const lp: LoopPolys = {
    n: polyMul(comp.num, plant.num),
    d: polyMul(comp.den, plant.den),
    nu: polyMul(comp.num, plant.den),
    delayS: plant.delayS + comp.delayS,
  };
  const ps = poles.filter((p) => Number.isFinite(p.re) && Number.isFinite(p.im));
  const amp = (v: C) => {
    const a = Math.hypot(v[0], v[1]);
    return Number.isFinite(a) ? a : Infinity;
  };
  const modes: Mode[] = [];
  const done = new Set<number>();
  for (const group of clusters(ps)) {
    if (group.every((i) => done.has(i))) continue;
    const circle = clusterCircle(ps, group, lp.delayS);
    if (circle && circle.members.every((i) => !done.has(i))) {
      circle.members.forEach((i) => done.add(i));
      const b = laurent(lp, circle.c, circle.r, Math.min(circle.members.length + EXTRA_TERMS, MAX_TERMS));
      b.y.forEach((by, j) => modes.push({ p: circle.c, power: j, spread: circle.spread, yAmp: amp(by), uAmp: amp(b.u[j]!) }));
      continue;
    }
    for (const i of group) {
      if (done.has(i)) continue;
      done.add(i);
      const [y, u] = simpleResidues(lp, ps[i]!);
      modes.push({ p: ps[i]!, power: 0, spread: 0, yAmp: amp(y), uAmp: amp(u) });
    }
  }
  return modes;
}
