import type { Complex, TransferFunction } from '../model/tf.js';
import { realiseProper, type StateSpace } from './state-space.js';

/**
 * The unity-feedback loop u = C (r - y), y = P e^(-sT) u as one linear system in the
 * stacked state x = [x_C; x_P]:
 *
 *   x' = A x + Br r + Bd d,   y = Cy x + Dyr r + Dyd d,   u = Cu x + Dur r + Dud d,
 *
 * where d(t) = u(t - T) is the delayed plant input. With a delay, d is fed from a delay
 * line by the simulator. Without one the loop is closed here algebraically (Bd = 0):
 * a feedthrough in both C and P makes u appear on both sides of u = C (r - P u), which
 * is solved exactly by dividing by 1 + Dc Dp.
 */
export interface LoopSystem {
  readonly n: number;
  readonly a: Float64Array;
  readonly br: Float64Array;
  readonly bd: Float64Array;
  readonly cy: Float64Array;
  readonly dyr: number;
  readonly dyd: number;
  readonly cu: Float64Array;
  readonly dur: number;
  readonly dud: number;
  /** Total pure delay T in seconds (plant and compensator delays together). */
  readonly delayS: number;
  /** Poles of C and of P on their own (they act alone while a delay holds the loop open). */
  readonly openLoopPoles: readonly Complex[];
}

/** Stacks C and P into the loop system; throws when C or P is improper or 1 + Dc Dp = 0 without delay. */
export function buildLoopSystem(plant: TransferFunction, comp: TransferFunction): LoopSystem {
  const c = realiseProper(comp.num, comp.den);
  const p = realiseProper(plant.num, plant.den);
  const delayS = plant.delayS + comp.delayS;
  const sys = balance(delayS > 0 ? openAtDelay(c, p, delayS) : closeAlgebraically(c, p));
  return { ...sys, openLoopPoles: [...c.poles, ...p.poles] };
}

/**
 * Diagonal similarity x = D x' with powers of two (so exact in floating point) that makes
 * each state's incoming and outgoing weights alike. Without it a high-gain plant realised
 * as a cascade carries couplings like 5e12 beside poles of 0.5, and the exponential of
 * such a matrix is accurate only relative to its largest entry.
 */
function balance(sys: LoopSystem): LoopSystem {
  const n = sys.n;
  const a = Float64Array.from(sys.a);
  const br = Float64Array.from(sys.br), bd = Float64Array.from(sys.bd);
  const cy = Float64Array.from(sys.cy), cu = Float64Array.from(sys.cu);
  for (let sweep = 0; sweep < 60; sweep++) {
    let changed = false;
    for (let i = 0; i < n; i++) {
      // Outgoing: what state i feeds (column i); incoming: what feeds it (row i).
      let out = Math.abs(cy[i]!) + Math.abs(cu[i]!);
      let inc = Math.abs(br[i]!) + Math.abs(bd[i]!);
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        out += Math.abs(a[j * n + i]!);
        inc += Math.abs(a[i * n + j]!);
      }
      if (out === 0 || inc === 0) continue;
      // x_i = f x_i': column i times f, row i divided by f; pick f = 2^k with out f ~ inc / f.
      const f = 2 ** Math.round(Math.log2(inc / out) / 2);
      if (f === 1) continue;
      changed = true;
      for (let j = 0; j < n; j++) {
        a[j * n + i] *= f;
        a[i * n + j] /= f;
      }
      br[i] /= f; bd[i] /= f;
      cy[i] *= f; cu[i] *= f;
    }
    if (!changed) break;
  }
  return { ...sys, a, br, bd, cy, cu };
}

function zeros(n: number): Float64Array {
  return new Float64Array(n);
}

/** Copies block m (rows x cols, row-major) into the n x n matrix a at (r0, c0), scaled by f. */
function put(a: Float64Array, n: number, r0: number, c0: number, m: Float64Array, rows: number, cols: number, f = 1): void {
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) a[(r0 + i) * n + c0 + j] += f * m[i * cols + j]!;
}

/** Outer product u v^T as a rows x cols block. */
function outer(u: Float64Array, v: Float64Array): Float64Array {
  const m = new Float64Array(u.length * v.length);
  for (let i = 0; i < u.length; i++) for (let j = 0; j < v.length; j++) m[i * v.length + j] = u[i]! * v[j]!;
  return m;
}

function openAtDelay(c: StateSpace, p: StateSpace, delayS: number): LoopSystem {
  const nc = c.n;
  const n = nc + p.n;
  const a = zeros(n * n);
  put(a, n, 0, 0, c.a, nc, nc);
  put(a, n, 0, nc, outer(c.b, p.c), nc, p.n, -1);
  put(a, n, nc, nc, p.a, p.n, p.n);
  const br = zeros(n);
  const bd = zeros(n);
  const cy = zeros(n);
  const cu = zeros(n);
  for (let i = 0; i < nc; i++) {
    br[i] = c.b[i]!;
    bd[i] = -c.b[i]! * p.d;
    cu[i] = c.c[i]!;
  }
  for (let i = 0; i < p.n; i++) {
    bd[nc + i] = p.b[i]!;
    cy[nc + i] = p.c[i]!;
    cu[nc + i] = -c.d * p.c[i]!;
  }
  return { n, a, br, bd, cy, dyr: 0, dyd: p.d, cu, dur: c.d, dud: -c.d * p.d, delayS, openLoopPoles: [] };
}

function closeAlgebraically(c: StateSpace, p: StateSpace): LoopSystem {
  const delta = 1 + c.d * p.d;
  if (delta === 0) throw new Error('step: 1 + C(inf) P(inf) = 0, the loop is improper');
  const nc = c.n;
  const n = nc + p.n;
  // u = (Cc xc - Dc Cp xp + Dc r) / delta,  y = (Dp Cc xc + Cp xp + Dp Dc r) / delta.
  const cu = zeros(n);
  const cy = zeros(n);
  for (let i = 0; i < nc; i++) {
    cu[i] = c.c[i]! / delta;
    cy[i] = (p.d * c.c[i]!) / delta;
  }
  for (let i = 0; i < p.n; i++) {
    cu[nc + i] = (-c.d * p.c[i]!) / delta;
    cy[nc + i] = p.c[i]! / delta;
  }
  const dur = c.d / delta;
  const dyr = (p.d * c.d) / delta;
  // xc' = Ac xc + Bc (r - y),  xp' = Ap xp + Bp u.
  const a = zeros(n * n);
  put(a, n, 0, 0, c.a, nc, nc);
  put(a, n, 0, 0, outer(c.b, cy), nc, n, -1);
  put(a, n, nc, nc, p.a, p.n, p.n);
  put(a, n, nc, 0, outer(p.b, cu), p.n, n);
  const br = zeros(n);
  for (let i = 0; i < nc; i++) br[i] = c.b[i]! * (1 - dyr);
  for (let i = 0; i < p.n; i++) br[nc + i] = p.b[i]! * dur;
  return { n, a, br, bd: zeros(n), cy, dyr, dyd: 0, cu, dur, dud: 0, delayS: 0, openLoopPoles: [] };
}
