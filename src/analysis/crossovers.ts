import type { TransferFunction } from '../model/tf.js';
import { factoredAt, middleScaleRadS, type Factored } from './factors.js';
import { imagCrossInW2, magSquaredInW2 } from './jw-polys.js';
import type { LoopSamples } from './loop-samples.js';
import { polyIsZero, polyScaleVariable, polySub } from './poly.js';
import { polyRoots } from './roots.js';
import { brentRoot } from './scalar.js';

/**
 * Gain crossovers (|L| = 1) and phase crossovers (angle L = -180 mod 360) of a loop.
 * Delay-free loops: candidates are the positive real roots in w^2 of exact
 * polynomials (|N|^2 - |D|^2, Im N(jw)D(-jw)); a delay leaves |L| unchanged, so
 * gain crossovers use that route always. Every candidate is then polished by
 * Newton's method on the factored form (well conditioned at any frequency scale),
 * and sign changes on the sample grid are added by Brent's method as a backstop.
 */

const TWO_PI = 2 * Math.PI;

/** A bracketed phase crossing must land this close to the level (Brent's tolerance leaves far less). */
const CROSSING_TOL_RAD = 1e-6;

/** Angle wrapped into (-pi, pi]. */
export function wrapPi(x: number): number {
  const r = x - TWO_PI * Math.floor((x + Math.PI) / TWO_PI);
  return r === -Math.PI ? Math.PI : r;
}

/** The scale used for the crossover polynomials: that of the factored form, or computed from its roots. */
function scaleRadS(f: Factored): number {
  return f.poly?.w0 ?? middleScaleRadS([...f.zeros, ...f.poles].map((r) => Math.hypot(r.re, r.im)));
}

/** Loop polynomials at s = w0 * sigma, sharing one normalising factor. */
function scaledPair(loop: TransferFunction, w0: number): [number[], number[]] {
  const n = polyScaleVariable(loop.num, w0);
  const d = polyScaleVariable(loop.den, w0);
  const m = Math.max(...d.map(Math.abs), ...n.map(Math.abs));
  return [n.map((c) => c / m), d.map((c) => c / m)];
}

/** Positive real roots w = w0 sqrt(x) of a polynomial in x = (w/w0)^2, allowing small imaginary noise. */
function positiveRootsInW(p: number[], w0: number): number[] {
  if (polyIsZero(p) || p.length < 2) return [];
  return polyRoots(p)
    .filter((x) => x.re > 0 && Math.abs(x.im) <= 1e-4 * x.re)
    .map((x) => w0 * Math.sqrt(x.re));
}

/** Newton's method on g(ln w) with derivative; returns the root frequency or NaN when it does not converge. */
function newtonLogW(g: (w: number, out: Float64Array) => [number, number], w: number, tolG: number): number {
  const v = new Float64Array(4);
  let u = Math.log(w);
  for (let it = 0; it < 60; it++) {
    const wi = Math.exp(u);
    const [val, dval] = g(wi, v);
    if (Math.abs(val) < 1e-15) return wi;
    const dU = dval * wi;
    if (dU === 0 || !Number.isFinite(dU)) break;
    let step = val / dU;
    if (Math.abs(step) > 0.5) step = Math.sign(step) * 0.5;
    u -= step;
    if (Math.abs(step) < 1e-15 * Math.max(1, Math.abs(u))) break;
  }
  const wf = Math.exp(u);
  return Math.abs(g(wf, v)[0]) < tolG ? wf : Number.NaN;
}

/** Sorted, with near-duplicates (relative 1e-8) merged. */
function uniqueSorted(ws: number[]): number[] {
  const s = ws.filter((w) => Number.isFinite(w) && w > 0).sort((a, b) => a - b);
  const out: number[] = [];
  for (const w of s) if (out.length === 0 || w > out[out.length - 1]! * (1 + 1e-8)) out.push(w);
  return out;
}

/** True when an imaginary-axis root of f lies in [wa, wb] (the phase jumps there, it does not cross). */
function axisRootBetween(f: Factored, wa: number, wb: number): boolean {
  for (const r of [...f.zeros, ...f.poles]) if (r.re === 0 && Math.abs(r.im) >= wa && Math.abs(r.im) <= wb) return true;
  return false;
}

const logMagFn = (f: Factored) => (w: number, v: Float64Array): [number, number] => {
  factoredAt(f, w, v);
  return [v[0]!, v[2]!];
};

const phaseFn = (f: Factored) => (w: number, v: Float64Array): [number, number] => {
  factoredAt(f, w, v);
  return [wrapPi(v[1]! + Math.PI), v[3]!];
};

/** All finite w > 0 with |L(jw)| = 1, ascending; `known` skips the polynomial route (already done) and adds grid brackets. */
export function gainCrossoversRadS(loop: TransferFunction, f: Factored, samples: LoopSamples | null, known?: readonly number[]): number[] {
  if (f.gain === 0) return [];
  const found: number[] = known ? [...known] : [];
  if (!known) {
    const w0 = scaleRadS(f);
    const [n, d] = scaledPair(loop, w0);
    const m = polySub(magSquaredInW2(n), magSquaredInW2(d));
    for (const w of positiveRootsInW(m, w0)) found.push(newtonLogW(logMagFn(f), w, 1e-9));
  }
  if (samples !== null) {
    const { wRadS: ws, logMag: lm } = samples;
    const v = new Float64Array(4);
    for (let i = 0; i + 1 < ws.length; i++) {
      if (!(lm[i]! * lm[i + 1]! < 0) || !Number.isFinite(lm[i]! * lm[i + 1]!)) continue;
      const u = brentRoot((x) => factoredAt(f, Math.exp(x), v)[0]!, Math.log(ws[i]!), Math.log(ws[i + 1]!));
      found.push(Math.exp(u));
    }
  }
  return uniqueSorted(found);
}

/** Finite w > 0 where angle L(jw) = -180 deg mod 360 (L finite and nonzero), ascending. Delay loops use the samples only. */
export function phaseCrossoversRadS(loop: TransferFunction, f: Factored, samples: LoopSamples | null): number[] {
  if (f.gain === 0) return [];
  const found: number[] = [];
  const v = new Float64Array(4);
  if (f.delayS === 0) {
    const w0 = scaleRadS(f);
    const [n, d] = scaledPair(loop, w0);
    for (const w of positiveRootsInW(imagCrossInW2(n, d), w0)) {
      factoredAt(f, w, v);
      if (!Number.isFinite(v[0]!) || Math.abs(wrapPi(v[1]! + Math.PI)) > Math.PI / 2) continue;
      found.push(newtonLogW(phaseFn(f), w, 1e-9));
    }
  }
  if (samples !== null) {
    const { wRadS: ws, phaseRad: ph } = samples;
    for (let i = 0; i + 1 < ws.length; i++) {
      const ka = Math.floor((ph[i]! + Math.PI) / TWO_PI);
      const kb = Math.floor((ph[i + 1]! + Math.PI) / TWO_PI);
      if (ka === kb || axisRootBetween(f, ws[i]!, ws[i + 1]!)) continue;
      // One level per interval after refinement; take the one between the two ends.
      const level = -Math.PI + TWO_PI * Math.max(ka, kb);
      const u = brentRoot((x) => factoredAt(f, Math.exp(x), v)[1]! - level, Math.log(ws[i]!), Math.log(ws[i + 1]!));
      // A jump of the phase branch (no root in between) also changes sign: keep only real crossings.
      if (Math.abs(factoredAt(f, Math.exp(u), v)[1]! - level) <= CROSSING_TOL_RAD) found.push(Math.exp(u));
    }
  }
  return uniqueSorted(found).filter((w) => Number.isFinite(factoredAt(f, w, v)[0]!));
}
