import { discretise, doubleStep, type Discrete } from './step-discrete.js';
import type { PlanLevel, StepPlan } from './step-plan.js';
import { OUT_Y, composeStepMap, implicitStepMap } from './step-sim-implicit.js';
import type { LoopSystem } from './step-system.js';

/**
 * Unit-step simulation of a LoopSystem on a planned grid (step-plan.ts): exact at the grid
 * points for the delay-free loop; with a delay, exact up to a cubic interpolation of the
 * delayed input across each step.
 *
 * Discretisation (Van Loan): in the scaled time v = t/h of one step, the exponential of
 *   [[A h, Br h, Bd h, 0, 0, 0], [0 ...], [0, 0, 0, 1, 0, 0], [0, 0, 0, 0, 2, 0], [0, 0, 0, 0, 0, 3], [0 ...]]
 * holds Phi = e^(Ah), Gr = int_0^h e^(As) ds Br and G_j = h int_0^1 e^(A h (1-v)) Bd v^j dv
 * (j = 0..3: the integrator chain turns a unit start in slot j into the input v^j). A
 * delayed input d(v) = c0 + c1 v + c2 v^2 + c3 v^3 is then integrated exactly:
 *   x_{k+1} = Phi x_k + Gr + sum_j c_j G_j.
 * The cubic is the Hermite piece of the past u through its values and slopes at t_k - T
 * and t_(k+1) - T, which are grid points while the step does not exceed T (T is a whole
 * number of base steps). u is smooth between multiples of T, all of which are then grid
 * points, so the piece is accurate to O(h^4). Once u is smooth and the fast modes have
 * gone, steps longer than T run through the implicit map of step-sim-implicit.ts.
 * The reference r = 1 is constant for t > 0.
 *
 * Signals may jump at grid points (at t = 0, and at multiples of the delay when C has a
 * feedthrough), so every grid point keeps a left (-) and a right (+) value, and each step
 * the one-sided slopes at both of its ends, for cubic Hermite interpolation of y and u.
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
  // Delay line: index of the past grid point t_(k+1) - T (advances monotonically), -1 before it exists.
  let back = -1;
  // The delayed input d and its slope just after t_k (zero until t = T).
  let dPlus = 0;
  let dDotPlus = 0;
  yPlus[0] = dyr;
  uPlus[0] = dur;
  let disc: Discrete | null = null;
  let stride = 1;
  let k = 0;
  let z: Float64Array | null = null;
  let map: Float64Array | null = null;
  let mapStride = 0;
  for (const level of plan.levels) {
    if (delayed && level.stride > m) {
      // Steps longer than the delay: the affine implicit map, carrying z = [x; d; d'; u; u'].
      if (!z) {
        z = new Float64Array(n + 4);
        z.set(x);
        let cuAx = 0;
        for (let i = 0; i < n; i++) cuAx += cuA[i]! * x[i]!;
        z[n] = dPlus; z[n + 1] = dDotPlus; z[n + 2] = uPlus[k]!;
        z[n + 3] = cuAx + cuBr + cuBd * dPlus + dud * dDotPlus;
      }
      if (!map) {
        map = implicitStepMap(sys, plan.h0S * level.stride, plan.h0S * m, discretise(sys, plan.h0S * m, true));
        mapStride = level.stride;
      }
      for (; mapStride < level.stride; mapStride *= 2) map = composeStepMap(map, n);
      k = implicitLevel(n, plan.h0S, level, map, z, k, { ticks, tS, yMinus, yPlus, dyStart, dyEnd, uMinus, uPlus, duStart, duEnd });
      continue;
    }
    while (stride < level.stride) {
      if (disc) disc = doubleStep(disc, n);
      stride *= 2;
    }
    disc ??= discretise(sys, plan.h0S * stride, delayed);
    const { phi, gr, g } = disc;
    const [g0, g1, g2, g3] = g;
    const h = plan.h0S * stride;
    for (let step = 0; step < level.steps; step++, k++) {
      const k1 = k + 1;
      const tick1 = ticks[k]! + stride;
      let dMinus = 0, dDotMinus = 0;
      if (delayed && tick1 - m >= 0) {
        // The grid holds t - T (see above); back never passes the newest point k.
        back++;
        while (back < k && ticks[back]! < tick1 - m) back++;
        dMinus = uMinus[back]!;
        dDotMinus = back > 0 ? duEnd[back - 1]! : 0;
      }
      let cyAx = 0, cuAx = 0;
      for (let i = 0; i < n; i++) {
        cyAx += cyA[i]! * x[i]!;
        cuAx += cuA[i]! * x[i]!;
      }
      dyStart[k] = cyAx + cyBr + cyBd * dPlus + dyd * dDotPlus;
      duStart[k] = cuAx + cuBr + cuBd * dPlus + dud * dDotPlus;
      if (delayed) {
        // Hermite cubic of the delayed input over this step, in v = (t - t_k)/h.
        const s0 = dDotPlus * h, s1 = dDotMinus * h;
        const c2 = 3 * (dMinus - dPlus) - 2 * s0 - s1;
        const c3 = 2 * (dPlus - dMinus) + s0 + s1;
        for (let i = 0; i < n; i++) {
          let s = gr[i]! + dPlus * g0![i]! + s0 * g1![i]! + c2 * g2![i]! + c3 * g3![i]!;
          const io = i * n;
          for (let j = 0; j < n; j++) s += phi[io + j]! * x[j]!;
          xn[i] = s;
        }
      } else {
        for (let i = 0; i < n; i++) {
          let s = gr[i]!;
          const io = i * n;
          for (let j = 0; j < n; j++) s += phi[io + j]! * x[j]!;
          xn[i] = s;
        }
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
      dyEnd[k] = cyAx + cyBr + cyBd * dMinus + dyd * dDotMinus;
      duEnd[k] = cuAx + cuBr + cuBd * dMinus + dud * dDotMinus;
      if (delayed && back >= 0) {
        dPlus = uPlus[back]!;
        dDotPlus = duStart[back]!;
      }
      ticks[k1] = tick1;
      tS[k1] = tick1 * plan.h0S;
      yMinus[k1] = cyx + dyr + dyd * dMinus;
      yPlus[k1] = cyx + dyr + dyd * dPlus;
      uMinus[k1] = cux + dur + dud * dMinus;
      uPlus[k1] = cux + dur + dud * dPlus;
    }
  }
  return { tS, yMinus, yPlus, dyStart, dyEnd, uMinus, uPlus, duStart, duEnd };
}

/** Runs one level of steps longer than the delay with the step map q from grid index k; updates z in place and returns the new index. */
function implicitLevel(n: number, h0S: number, level: PlanLevel, q: Float64Array, z: Float64Array, k: number, tr: StepTrace & { ticks: Float64Array }): number {
  const rows = n + 7;
  const cols = n + 5;
  const out = new Float64Array(rows);
  for (let step = 0; step < level.steps; step++, k++) {
    for (let r = 0; r < rows; r++) {
      const ro = r * cols;
      let s = q[ro + n + 4]!;
      for (let c = 0; c < n + 4; c++) s += q[ro + c]! * z[c]!;
      out[r] = s;
    }
    const k1 = k + 1;
    tr.duStart[k] = z[n + 3]!;
    tr.dyStart[k] = out[n + OUT_Y + 2]!;
    for (let c = 0; c < n + 4; c++) z[c] = out[c]!;
    tr.ticks[k1] = tr.ticks[k]! + level.stride;
    tr.tS[k1] = tr.ticks[k1]! * h0S;
    tr.uMinus[k1] = tr.uPlus[k1] = z[n + 2]!;
    tr.duEnd[k] = z[n + 3]!;
    tr.yMinus[k1] = tr.yPlus[k1] = out[n + OUT_Y]!;
    tr.dyEnd[k] = out[n + OUT_Y + 1]!;
  }
  return k;
}
