import { expm, matMul } from './expm.js';
import type { LoopSystem } from './step-system.js';

/**
 * Exact zero-order and polynomial-input discretisation of a LoopSystem for one step
 * (see step-sim.ts for how the pieces are used).
 */

/** The discretised step: Phi, Gr and (with a delay) G_0..G_3 (see the file comment). */
export interface Discrete {
  phi: Float64Array;
  gr: Float64Array;
  g: Float64Array[];
}

/** Exact discretisation for step h by the exponential of the augmented matrix. */
export function discretise(sys: LoopSystem, h: number, delayed: boolean): Discrete {
  const n = sys.n;
  const extra = delayed ? 5 : 1;
  const q = n + extra;
  const big = new Float64Array(q * q);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) big[i * q + j] = sys.a[i * n + j]! * h;
    big[i * q + n] = sys.br[i]! * h;
    if (delayed) big[i * q + n + 1] = sys.bd[i]! * h;
  }
  if (delayed) for (let j = 1; j <= 3; j++) big[(n + j) * q + n + j + 1] = j;
  const e = expm(big, q);
  const phi = new Float64Array(n * n);
  const gr = new Float64Array(n);
  const g = delayed ? [0, 1, 2, 3].map(() => new Float64Array(n)) : [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) phi[i * n + j] = e[i * q + j]!;
    gr[i] = e[i * q + n]!;
    for (let j = 0; j < g.length; j++) g[j]![i] = e[i * q + n + 1 + j]!;
  }
  return { phi, gr, g };
}

const BINOMIAL = [[1], [1, 1], [1, 2, 1], [1, 3, 3, 1]];

/**
 * The same for step 2h from step h, by the semigroup property: Phi(2h) = Phi^2,
 * Gr(2h) = Phi Gr + Gr, and for the input ((v'+ i)/2)^j over the two halves i = 0, 1,
 * G_j(2h) = (Phi G_j + sum_i binom(j, i) G_i) / 2^j. This is the squaring phase of expm.
 */
export function doubleStep(d: Discrete, n: number): Discrete {
  const phi = matMul(d.phi, d.phi, n);
  const mulAdd = (v: Float64Array, w: Float64Array) => {
    const r = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = w[i]!;
      for (let j = 0; j < n; j++) s += d.phi[i * n + j]! * v[j]!;
      r[i] = s;
    }
    return r;
  };
  const gr = mulAdd(d.gr, d.gr);
  const g = d.g.map((gj, j) => {
    const sum = new Float64Array(n);
    for (let i = 0; i <= j; i++) for (let r = 0; r < n; r++) sum[r] += BINOMIAL[j]![i]! * d.g[i]![r]!;
    const out = mulAdd(gj, sum);
    for (let r = 0; r < n; r++) out[r] /= 2 ** j;
    return out;
  });
  return { phi, gr, g };
}

