import { expm, matMul } from './expm.js';
import type { StepPlan } from './step-plan.js';
import type { LoopSystem } from './step-system.js';

/**
 * Unit-step simulation of a LoopSystem on a planned grid (step-plan.ts), exact for the
 * delay-free loop, and for a delay of whole steps up to the hold of the delayed input.
 *
 * Discretisation (Van Loan): the exponential of the augmented matrix
 *   h [[A, Br, Bd, 0], [0, 0, 0, 0], [0, 0, 0, 1/h], [0, 0, 0, 0]]
 * holds Phi = e^(Ah), Gr = int_0^h e^(As) ds Br, G1 = int_0^h e^(As) ds Bd and
 * G2 = int_0^h e^(A(h-s)) Bd s/h ds, so a delayed input d that is linear across a step
 * (first-order hold between the delay-line samples) is integrated exactly:
 *   x_{k+1} = Phi x_k + Gr + (G1 - G2) d_k^+ + G2 d_{k+1}^-.
 * The reference r = 1 is constant for t > 0, so the delay-free loop (Bd = 0) is exact at
 * every grid point. Signals may jump at grid points (at t = 0, and at multiples of the
 * delay when C has a feedthrough), so every grid point keeps a left (-) and a right (+)
 * value, and each step the one-sided slopes at both of its ends, for cubic Hermite
 * interpolation inside the step.
 */
export interface StepTrace {
  /** Grid times t_0 = 0 < t_1 < ... (N + 1 points). */
  readonly tS: Float64Array;
  readonly yMinus: Float64Array;
  readonly yPlus: Float64Array;
  /** y' at the start of step k (right of t_k) and at its end (left of t_(k+1)), indexed by k. */
  readonly dyStart: Float64Array;
  readonly dyEnd: Float64Array;
  readonly uMinus: Float64Array;
  readonly uPlus: Float64Array;
  readonly duStart: Float64Array;
  readonly duEnd: Float64Array;
}

/** Row vector v^T A for row-major n x n A. */
function rowTimes(v: Float64Array, a: Float64Array, n: number): Float64Array {
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const vi = v[i]!;
    if (vi === 0) continue;
    for (let j = 0; j < n; j++) r[j] += vi * a[i * n + j]!;
  }
  return r;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}

/** The discretised step: Phi, Gr, G1 - G2 and G2 (see the file comment). */
interface Discrete {
  phi: Float64Array;
  gr: Float64Array;
  g1: Float64Array;
  g2: Float64Array;
}

/** Exact discretisation for step h by the exponential of the augmented matrix. */
function discretise(sys: LoopSystem, h: number): Discrete {
  const n = sys.n;
  const q = n + 3;
  const big = new Float64Array(q * q);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) big[i * q + j] = sys.a[i * n + j]! * h;
    big[i * q + n] = sys.br[i]! * h;
    big[i * q + n + 1] = sys.bd[i]! * h;
  }
  big[(n + 1) * q + n + 2] = 1;
  const e = expm(big, q);
  const phi = new Float64Array(n * n);
  const gr = new Float64Array(n), g1 = new Float64Array(n), g2 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) phi[i * n + j] = e[i * q + j]!;
    gr[i] = e[i * q + n]!;
    g1[i] = e[i * q + n + 1]!;
    g2[i] = e[i * q + n + 2]!;
  }
  return { phi, gr, g1, g2 };
}

/**
 * The same for step 2h from step h, by the semigroup property: Phi(2h) = Phi^2,
 * Gr(2h) = Phi Gr + Gr, G1(2h) = Phi G1 + G1, and for the ramp (weights s/2h over two
 * halves) G2(2h) = (Phi G2 + G1 + G2) / 2. This is the squaring phase of expm itself.
 */
function doubleStep(d: Discrete, n: number): Discrete {
  const phi = matMul(d.phi, d.phi, n);
  const gr = new Float64Array(n), g1 = new Float64Array(n), g2 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sr = 0, s1 = 0, s2 = 0;
    for (let j = 0; j < n; j++) {
      const p = d.phi[i * n + j]!;
      sr += p * d.gr[j]!;
      s1 += p * d.g1[j]!;
      s2 += p * d.g2[j]!;
    }
    gr[i] = sr + d.gr[i]!;
    g1[i] = s1 + d.g1[i]!;
    g2[i] = (s2 + d.g1[i]! + d.g2[i]!) / 2;
  }
  return { phi, gr, g1, g2 };
}

/** Simulates the planned grid (levels of doubling steps, delay a whole number of base steps). */
export function simulateStep(sys: LoopSystem, plan: StepPlan): StepTrace {
  const n = sys.n;
  const cyA = rowTimes(sys.cy, sys.a, n);
  const cuA = rowTimes(sys.cu, sys.a, n);
  const cyBr = dot(sys.cy, sys.br), cyBd = dot(sys.cy, sys.bd);
  const cuBr = dot(sys.cu, sys.br), cuBd = dot(sys.cu, sys.bd);
  const { cy, cu, dyr, dyd, dur, dud } = sys;

  const total = plan.levels.reduce((acc, l) => acc + l.steps, 0);
  const len = total + 1;
  const tS = new Float64Array(len);
  const ticks = new Float64Array(len);
  const yMinus = new Float64Array(len), yPlus = new Float64Array(len);
  const uMinus = new Float64Array(len), uPlus = new Float64Array(len);
  const dyStart = new Float64Array(len), dyEnd = new Float64Array(len);
  const duStart = new Float64Array(len), duEnd = new Float64Array(len);
  let x = new Float64Array(n);
  let xn = new Float64Array(n);
  const m = plan.delayTicks;
  const delayed = m > 0;
  // Index of the past grid point t - T for the start of the current step (advances monotonically).
  let back = 0;
  // Grid point 0: everything is zero before the step; r jumps to 1 at 0+.
  let dPlus = 0;
  yPlus[0] = dyr;
  uPlus[0] = dur;
  let disc: Discrete | null = null;
  let stride = 1;
  let k = 0;
  for (const level of plan.levels) {
    while (stride < level.stride) {
      if (disc) disc = doubleStep(disc, n);
      stride *= 2;
    }
    disc ??= discretise(sys, plan.h0S * stride);
    const { phi, gr, g1, g2 } = disc;
    const h = plan.h0S * stride;
    for (let step = 0; step < level.steps; step++, k++) {
      const k1 = k + 1;
      const tick1 = ticks[k]! + stride;
      let dNextMinus = 0;
      if (delayed && tick1 - m >= 0) {
        while (ticks[back]! < tick1 - m) back++;
        dNextMinus = uMinus[back]!;
      }
      const slope = (dNextMinus - dPlus) / h;
      let cyAx = 0, cuAx = 0;
      for (let i = 0; i < n; i++) {
        cyAx += cyA[i]! * x[i]!;
        cuAx += cuA[i]! * x[i]!;
      }
      dyStart[k] = cyAx + cyBr + cyBd * dPlus + dyd * slope;
      duStart[k] = cuAx + cuBr + cuBd * dPlus + dud * slope;
      for (let i = 0; i < n; i++) {
        let s = gr[i]! + (g1[i]! - g2[i]!) * dPlus + g2[i]! * dNextMinus;
        const io = i * n;
        for (let j = 0; j < n; j++) s += phi[io + j]! * x[j]!;
        xn[i] = s;
      }
      const t = x; x = xn; xn = t;
      let cyx = 0, cux = 0;
      cyAx = 0; cuAx = 0;
      for (let i = 0; i < n; i++) {
        const xi = x[i]!;
        cyx += cy[i]! * xi;
        cux += cu[i]! * xi;
        cyAx += cyA[i]! * xi;
        cuAx += cuA[i]! * xi;
      }
      dyEnd[k] = cyAx + cyBr + cyBd * dNextMinus + dyd * slope;
      duEnd[k] = cuAx + cuBr + cuBd * dNextMinus + dud * slope;
      dPlus = delayed && tick1 - m >= 0 ? uPlus[back]! : 0;
      ticks[k1] = tick1;
      tS[k1] = tick1 * plan.h0S;
      yMinus[k1] = cyx + dyr + dyd * dNextMinus;
      yPlus[k1] = cyx + dyr + dyd * dPlus;
      uMinus[k1] = cux + dur + dud * dNextMinus;
      uPlus[k1] = cux + dur + dud * dPlus;
    }
  }
  return { tS, yMinus, yPlus, dyStart, dyEnd, uMinus, uPlus, duStart, duEnd };
}
