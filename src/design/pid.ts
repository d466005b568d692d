import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import { brentMin, brentRoot } from '../analysis/scalar.js';
import { constantShortfalls } from './lead-fc.js';
import { AIM_ABOVE_DEG, worstPmOver } from './refine.js';
import { wrapPi } from '../analysis/crossovers.js';
import { shapeMagnitude, shapePhaseDeg } from './shape.js';
import type { ErrorConstantTarget } from './targets.js';
import { failedOutcome, type Candidate, type DesignOutcome, type DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/**
 * PI and PID with a derivative filter by frequency-domain placement: the
 * Ziegler-Nichols frequency-response method as generalised by Astrom and Hagglund
 * (PID Controllers: Theory, Design, and Tuning, 2nd ed., 1995, ch. 4, from memory):
 * the controller moves one point of the plant's Nyquist curve, P(j fc), onto the
 * unit circle at the angle that leaves the wanted phase margin. Two equations
 * (magnitude and angle at fc) fix two unknowns; the third is tied by Ti = 4 Td as
 * in the Ziegler-Nichols rules. The derivative is filtered at N/Td with N = 10
 * (common practice).
 */

const TI_OVER_TD = 4;
const FILTER_N = 10;
const RAD = 180 / Math.PI;

/** Settings of the PI/PID placement. */
export interface PidSettings {
  readonly pmDeg: number;
  readonly fcRadS: number;
  /** 'auto' uses PI when the plant has phase to spare at fc, PID when it lacks phase. */
  readonly form: 'auto' | 'pi' | 'pid';
  readonly targets: readonly ErrorConstantTarget[];
}

/** The normalised PID 1 + 1/(4 x j) + j x/(1 + j x/N) at x = fc·Td, as [re, im]. */
function normalisedPid(x: number): [number, number] {
  const a = x / FILTER_N;
  const d = 1 + a * a;
  return [1 + (x * a) / d, -1 / (TI_OVER_TD * x) + x / d];
}

function pidPhaseDeg(x: number): number {
  const [re, im] = normalisedPid(x);
  return Math.atan2(im, re) * RAD;
}

/** The largest phase the filtered PID can give (deg) and the x = fc·Td where it does. */
export function pidMaxPhase(): { phaseDeg: number; x: number } {
  const [lx, neg] = brentMin((l) => -pidPhaseDeg(Math.exp(l)), Math.log(1e-3), Math.log(1e3));
  return { phaseDeg: -neg, x: Math.exp(lx) };
}

/** Places a PI or PID so that |L(j fc)| = 1 with the target phase margin there (worst variant checked). */
export function designPid(variants: readonly DesignVariant[], designIndex: number, s: PidSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  const fc = s.fcRadS;
  ws.section(`placement at fc (on variant ${v.name})`);
  ws.add('chosen crossover fc', fc, 'rad/s');
  const mag = shapeMagnitude(v.shape, fc);
  const ph = shapePhaseDeg(v.shape, fc);
  ws.add('|P(j fc)|', mag);
  ws.add('phase of P(j fc)', ph, 'deg');
  ws.add('target phase margin', s.pmDeg, 'deg');
  const theta = wrapPi((-180 + s.pmDeg + AIM_ABOVE_DEG - ph) / RAD) * RAD;
  ws.add('phase the controller must give at fc', theta, 'deg');
  const form = s.form === 'auto' ? (theta <= 0 ? 'pi' : 'pid') : s.form;
  let block: Block;
  if (form === 'pi') {
    if (theta > 0) return failedOutcome(ws.steps, `a PI only lags, but ${formatNumber(theta)} deg of lead is needed at fc: use --form pid, a lead, or a lower fc`);
    if (theta <= -89.9) return failedOutcome(ws.steps, `the plant has too much phase at fc (${formatNumber(theta)} deg to remove): choose a higher fc`);
    // angle(1 + 1/(j w Ti)) = -atan(1/(w Ti))
    const wTi = theta === 0 ? Infinity : 1 / Math.tan(-theta / RAD);
    const cMag = Math.hypot(1, 1 / wTi);
    const kp = 1 / (mag * cMag);
    const ki = Number.isFinite(wTi) ? (kp * fc) / wTi : 0;
    ws.add('form', 'PI');
    ws.add('integral time Ti = 1/(fc tan(-angle))', wTi / fc, 's');
    ws.add('kp = 1/(|P| |1 + 1/(j fc Ti)|)', kp);
    ws.add('ki = kp / Ti', ki, '1/s');
    block = { kind: 'pid', kp, ki, kd: 0, filterRadS: Infinity };
  } else {
    const peak = pidMaxPhase();
    ws.add('form', 'PID, Ti = 4 Td, derivative filter N = 10');
    ws.add('largest phase this PID can give', peak.phaseDeg, 'deg');
    if (theta >= peak.phaseDeg) return failedOutcome(ws.steps, `${formatNumber(theta)} deg of lead is needed at fc but a filtered PID gives at most ${formatNumber(peak.phaseDeg, 3)} deg: lower fc or add a lead block`);
    if (theta <= -89.9) return failedOutcome(ws.steps, `the plant has too much phase at fc (${formatNumber(theta)} deg to remove): choose a higher fc`);
    // The phase rises monotonically from -90 deg (x -> 0) to its peak: one root on that branch.
    const lx = brentRoot((l) => pidPhaseDeg(Math.exp(l)) - theta, Math.log(1e-6), Math.log(peak.x), 1e-14);
    const x = Math.exp(lx);
    const td = x / fc;
    const [re, im] = normalisedPid(x);
    const kp = 1 / (mag * Math.hypot(re, im));
    ws.add('derivative time Td (solves the angle at fc)', td, 's');
    ws.add('integral time Ti = 4 Td', TI_OVER_TD * td, 's');
    ws.add('derivative filter N / Td', FILTER_N / td, 'rad/s');
    ws.add('kp = 1/(|P| |C(j fc)/kp|)', kp);
    ws.add('ki = kp / Ti', kp / (TI_OVER_TD * td), '1/s');
    ws.add('kd = kp Td', kp * td, 's');
    block = { kind: 'pid', kp, ki: kp / (TI_OVER_TD * td), kd: kp * td, filterRadS: FILTER_N / td };
  }
  const blocks = [block];
  const cand: Candidate = { blocks, worstPmDeg: worstPmOver(variants, blocks) };
  ws.add('phase margin (worst variant)', cand.worstPmDeg, 'deg');
  const misses = constantShortfalls(v, blocks, s.targets, ws);
  const pmOk = cand.worstPmDeg >= s.pmDeg;
  const what = form === 'pi' ? 'PI' : 'PID';
  const msg = !pmOk
    ? `${what} placed at fc gives ${formatNumber(cand.worstPmDeg, 3)} deg on the worst variant, below the target: lower fc`
    : misses.length > 0 ? `${what} placed at fc; ${misses.join(', ')}` : `${what} placed at fc with the target phase margin`;
  return { blocks, hand: cand, refined: null, worksheet: ws.steps, feasible: pmOk && misses.length === 0, message: msg };
}
