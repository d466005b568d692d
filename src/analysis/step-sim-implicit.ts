import { discretise, type Discrete } from './step-discrete.js';
import type { LoopSystem } from './step-system.js';

/**
 * Steps longer than the delay. Once the fast modes have died, the step may grow far
 * beyond a short delay T (a 0.2 ms delay in a loop that settles in seconds). The delayed
 * input over a step [t_k, t_k + h] is then u over [t_k - T, t_k + h - T], which reaches
 * into the step itself, so the step is implicit. With u represented by cubic Hermite
 * pieces it is still linear, and solved exactly:
 *
 * - on [t_k, t_k + T] the input is the Hermite piece of u over the window [t_k - T, t_k]
 *   through d = u(t_k - T), d', u_k, u_k' (all known at t_k);
 * - on [t_k + T, t_k + h] it is the piece of u over the step itself, through u_k, u_k'
 *   and the unknown u_(k+1), u_(k+1)'; its value and slope at t_(k+1) - T are the next d, d'.
 *
 * The two unknowns follow from u = Cu x + Dur + Dud d and its derivative at t_(k+1). All of
 * it is affine in z_k = [x_k; d; d'; u_k; u_k'], so one step is out = Q [z_k; 1], with Q
 * built once per step length. u must be smooth here: the planner starts these steps only
 * after the jumps and kinks that the delay passes around have faded.
 */

/** Rows of the step map output: [x_(k+1) (n); d; d'; u; u'; y; y' at t_(k+1); y' at t_k+]. */
export const OUT_Y = 4;

/** The affine step map for steps of h > T, as a row-major (n + 7) x (n + 5) matrix (last column constant); d1 is the discretisation for step T. */
export function implicitStepMap(sys: LoopSystem, hS: number, delayS: number, d1: Discrete): Float64Array {
  const n = sys.n;
  const theta = delayS / hS;
  const d2 = discretise(sys, hS - delayS, true);
  const cyA = new Float64Array(n), cuA = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      cyA[j] += sys.cy[i]! * sys.a[i * n + j]!;
      cuA[j] += sys.cu[i]! * sys.a[i * n + j]!;
    }
  }
  let cyBr = 0, cyBd = 0, cuBr = 0, cuBd = 0;
  for (let i = 0; i < n; i++) {
    cyBr += sys.cy[i]! * sys.br[i]!; cyBd += sys.cy[i]! * sys.bd[i]!;
    cuBr += sys.cu[i]! * sys.br[i]!; cuBd += sys.cu[i]! * sys.bd[i]!;
  }
  const xMid = new Float64Array(n);
  const x1 = new Float64Array(n);
  const rows = n + 7;
  const cols = n + 5;

  /** One step from z (scaled by c1 for the constant terms) with given u1, u1'; writes out and returns the residuals. */
  const evalStep = (z: Float64Array, one: number, u1: number, du1: number, out: Float64Array): [number, number] => {
    const d = z[n]!, dd = z[n + 1]!, u = z[n + 2]!, du = z[n + 3]!;
    // The Hermite piece of u over the window [t_k - T, t_k] is the input over [t_k, t_k + T].
    const s0 = delayS * dd, s1 = delayS * du;
    const c2 = 3 * (u - d) - 2 * s0 - s1, c3 = 2 * (d - u) + s0 + s1;
    const [g0, g1, g2, g3] = d1.g as [Float64Array, Float64Array, Float64Array, Float64Array];
    for (let i = 0; i < n; i++) {
      let s = one * d1.gr[i]! + d * g0[i]! + s0 * g1[i]! + c2 * g2[i]! + c3 * g3[i]!;
      for (let j = 0; j < n; j++) s += d1.phi[i * n + j]! * z[j]!;
      xMid[i] = s;
    }
    // The piece over the step, in w = (t - t_k)/h, is used on w in [theta, 1] as w - theta = (1 - theta) v.
    const e1 = hS * du, e3s = hS * du1;
    const e2 = 3 * (u1 - u) - 2 * e1 - e3s, e3 = 2 * (u - u1) + e1 + e3s;
    const span = 1 - theta;
    const f1 = e1 * span, f2 = e2 * span * span, f3 = e3 * span * span * span;
    const dNext = u + f1 + f2 + f3;
    const dNextSlope = (e1 + 2 * e2 * span + 3 * e3 * span * span) / hS;
    const [k0, k1, k2, k3] = d2.g as [Float64Array, Float64Array, Float64Array, Float64Array];
    for (let i = 0; i < n; i++) {
      let s = one * d2.gr[i]! + u * k0[i]! + f1 * k1[i]! + f2 * k2[i]! + f3 * k3[i]!;
      for (let j = 0; j < n; j++) s += d2.phi[i * n + j]! * xMid[j]!;
      x1[i] = s;
    }
    let cux = 0, cuAx = 0, cyx = 0, cyAx = 0, cyAx0 = 0;
    for (let i = 0; i < n; i++) {
      cux += sys.cu[i]! * x1[i]!; cuAx += cuA[i]! * x1[i]!;
      cyx += sys.cy[i]! * x1[i]!; cyAx += cyA[i]! * x1[i]!;
      cyAx0 += cyA[i]! * z[i]!;
    }
    for (let i = 0; i < n; i++) out[i] = x1[i]!;
    out[n] = dNext;
    out[n + 1] = dNextSlope;
    out[n + 2] = u1;
    out[n + 3] = du1;
    out[n + OUT_Y] = cyx + one * sys.dyr + sys.dyd * dNext;
    out[n + OUT_Y + 1] = cyAx + one * cyBr + cyBd * dNext + sys.dyd * dNextSlope;
    out[n + OUT_Y + 2] = cyAx0 + one * cyBr + cyBd * d + sys.dyd * dd;
    return [
      cux + one * sys.dur + sys.dud * dNext - u1,
      cuAx + one * cuBr + cuBd * dNext + sys.dud * dNextSlope - du1,
    ];
  };

  // The residuals are affine in (u1, u1'): r = r(z; 0, 0) + J [u1; u1'], J independent of z.
  const scratch = new Float64Array(rows);
  const zero = new Float64Array(n + 4);
  const [a0, b0] = evalStep(zero, 0, 0, 0, scratch);
  const [a1, b1] = evalStep(zero, 0, 1, 0, scratch);
  const [a2, b2] = evalStep(zero, 0, 0, 1, scratch);
  const j11 = a1 - a0, j21 = b1 - b0, j12 = a2 - a0, j22 = b2 - b0;
  const det = j11 * j22 - j12 * j21;
  if (!(Math.abs(det) > 0)) throw new Error('step: singular implicit delay step');
  const q = new Float64Array(rows * cols);
  const unit = new Float64Array(n + 4);
  const col = new Float64Array(rows);
  for (let c = 0; c < cols; c++) {
    unit.fill(0);
    if (c < n + 4) unit[c] = 1;
    const one = c === n + 4 ? 1 : 0;
    const [r1, r2] = evalStep(unit, one, 0, 0, col);
    const u1 = -(j22 * r1 - j12 * r2) / det;
    const du1 = -(-j21 * r1 + j11 * r2) / det;
    evalStep(unit, one, u1, du1, col);
    for (let r = 0; r < rows; r++) q[r * cols + c] = col[r]!;
  }
  return q;
}

/**
 * The map of two consecutive steps as one (for a doubled step length): z rows and the end
 * values of y come from applying the map twice, y' at the start from the first step. Cheaper
 * than building the map for 2h afresh, and as accurate as the steps of h it is made of.
 */
export function composeStepMap(q: Float64Array, n: number): Float64Array {
  const rows = n + 7;
  const cols = n + 5;
  const out = new Float64Array(rows * cols);
  for (let r = 0; r < rows; r++) {
    const ro = r * cols;
    if (r === n + OUT_Y + 2) {
      for (let c = 0; c < cols; c++) out[ro + c] = q[ro + c]!;
      continue;
    }
    // Row r of the second step applied to [z rows of the first step; constant 1].
    for (let c = 0; c < cols; c++) {
      let s = c === cols - 1 ? q[ro + cols - 1]! : 0;
      for (let j = 0; j < n + 4; j++) s += q[ro + j]! * q[j * cols + c]!;
      out[ro + c] = s;
    }
  }
  return out;
}
