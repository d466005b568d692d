import { discretise } from './step-discrete.js';
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

/** Hermite cubic coefficients in v in [0, 1] from end values and slopes per unit v. */
function hermite(p0: number, s0: number, p1: number, s1: number): [number, number, number, number] {
  return [p0, s0, 3 * (p1 - p0) - 2 * s0 - s1, 2 * (p0 - p1) + s0 + s1];
}

/** The affine step map for steps of h > T, as a row-major (n + 7) x (n + 5) matrix (last column constant). */
export function implicitStepMap(sys: LoopSystem, hS: number, delayS: number): Float64Array {
  const n = sys.n;
  const theta = delayS / hS;
  const d1 = discretise(sys, delayS, true);
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
    const c = hermite(d, delayS * dd, u, delayS * du);
    for (let i = 0; i < n; i++) {
      let s = one * d1.gr[i]!;
      for (let j = 0; j < 4; j++) s += c[j]! * d1.g[j]![i]!;
      for (let j = 0; j < n; j++) s += d1.phi[i * n + j]! * z[j]!;
      xMid[i] = s;
    }
    // The piece over the step, in w = (t - t_k)/h, is used on w in [theta, 1] as w - theta = (1 - theta) v.
    const e = hermite(u, hS * du, u1, hS * du1);
    const span = 1 - theta;
    let dNext = 0, dNextSlope = 0;
    const f = [0, 0, 0, 0];
    for (let j = 0; j < 4; j++) {
      f[j] = e[j]! * span ** j;
      dNext += f[j]!;
      if (j > 0) dNextSlope += j * e[j]! * span ** (j - 1);
    }
    dNextSlope /= hS;
    for (let i = 0; i < n; i++) {
      let s = one * d2.gr[i]!;
      for (let j = 0; j < 4; j++) s += f[j]! * d2.g[j]![i]!;
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
