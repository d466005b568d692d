import type { Block } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Requirement } from '../model/requirements.js';
import { formatNumber } from '../model/units.js';
import { errorConstantTargets, type ErrorConstantTarget } from './targets.js';

/** The design methods of `tune`. */
export type TuneMethod = 'lead' | 'lag' | 'leadlag' | 'pid' | 'notch' | 'lowpass';

export const TUNE_METHODS: readonly TuneMethod[] = ['lead', 'lag', 'leadlag', 'pid', 'notch', 'lowpass'];

/** What the engineer may state beyond the loop's requirements. Every field is optional. */
export interface TuneOptions {
  /** Target phase margin (deg); default: the loop's largest `pm >=` requirement. */
  readonly pmDeg?: number | null;
  /** Chosen crossover (rad/s): lead at this crossover, PID placement, lead-lag crossover. */
  readonly fcRadS?: number | null;
  /** Error-constant target; default: the loop's `kp/kv/ka >=` requirements. */
  readonly errorConstant?: ErrorConstantTarget | null;
  /** Allowance (deg); default 5 for lead and lead-lag, 10 for lag. */
  readonly allowDeg?: number | null;
  /** Force this many lead stages. */
  readonly stages?: number | null;
  /** Largest phase one lead stage may add (deg); default 60. */
  readonly maxStagePhaseDeg?: number | null;
  /** The lag zero sits this many times below the crossover; default 10. */
  readonly lagZeroRatio?: number | null;
  /** The variant the hand procedure reads its plot from; default the first. */
  readonly designVariant?: string | null;
  /** PID form; default 'auto'. */
  readonly pidForm?: 'auto' | 'pi' | 'pid';
  /** Low-pass order; default 2. */
  readonly lowpassOrder?: 1 | 2;
  /** Damping below which a plant pole counts as a resonance; default 0.15. */
  readonly zetaMax?: number | null;
  /** Closed-loop bandwidth of the inner loop, for `sep` requirements. */
  readonly innerBandwidthRadS?: number | null;
  /** The existing compensator is marked ideal (improper allowed); matters for notch and lowpass, which keep it. */
  readonly ideal?: boolean;
}

/** Targets resolved from options and requirements. */
export interface ResolvedTargets {
  readonly pmDeg: number | null;
  readonly fcRadS: number | null;
  readonly errorConstants: readonly ErrorConstantTarget[];
  /** Requirements to judge the proposal on: the loop's plus the stated targets. */
  readonly requirements: readonly Requirement[];
}

/** Largest `pm >=` limit among requirements, or null. */
function pmFromRequirements(reqs: readonly Requirement[]): number | null {
  const v = reqs.filter((r) => r.metric === 'pm' && r.op === '>=').map((r) => r.value);
  return v.length === 0 ? null : Math.max(...v);
}

/** Largest `gm >=` limit among requirements (dB), or null. */
export function gmFromRequirements(reqs: readonly Requirement[]): number | null {
  const v = reqs.filter((r) => r.metric === 'gm' && r.op === '>=').map((r) => r.value);
  return v.length === 0 ? null : Math.max(...v);
}

/**
 * A crossover inside the loop's `fc` limits: 10 % above a lower limit, 10 % below an
 * upper one, the geometric middle of both; null without any.
 */
export function fcFromRequirements(reqs: readonly Requirement[]): number | null {
  const lo = reqs.filter((r) => r.metric === 'fc' && r.op === '>=').map((r) => r.value);
  const hi = reqs.filter((r) => r.metric === 'fc' && r.op === '<=').map((r) => r.value);
  const a = lo.length > 0 ? Math.max(...lo) : null;
  const b = hi.length > 0 ? Math.min(...hi) : null;
  if (a !== null && b !== null) return Math.sqrt(a * b);
  if (a !== null) return 1.1 * a;
  if (b !== null) return b / 1.1;
  return null;
}

/** Merges stated targets into the requirement list (a stated target stricter than the loop's own is added). */
export function resolveTargets(reqs: readonly Requirement[], o: TuneOptions): ResolvedTargets {
  const all = [...reqs];
  const pmReq = pmFromRequirements(reqs);
  const pmDeg = o.pmDeg ?? pmReq;
  if (o.pmDeg != null && (pmReq === null || o.pmDeg > pmReq)) {
    all.push({ metric: 'pm', op: '>=', value: o.pmDeg, text: `pm>=${formatNumber(o.pmDeg)} (target)` });
  }
  let errorConstants = errorConstantTargets(reqs);
  if (o.errorConstant) {
    const t = o.errorConstant;
    errorConstants = [t];
    if (!reqs.some((r) => r.metric === t.kind && r.op === '>=' && r.value >= t.value)) {
      all.push({ metric: t.kind, op: '>=', value: t.value, text: `${t.kind}>=${formatNumber(t.value)} (target)` });
    }
  }
  return { pmDeg, fcRadS: o.fcRadS ?? null, errorConstants, requirements: all };
}

/** The phase-margin target, or a clear refusal naming how to give one. */
export function needPm(t: ResolvedTargets, method: TuneMethod): number {
  if (t.pmDeg === null) throw new UserError(`tune ${method}: no phase-margin target; give --pm DEG or add a requirement pm>=DEG to the loop`);
  return t.pmDeg;
}

/**
 * Which existing blocks a design keeps. Lead, lag and lead-lag keep integral action
 * (integrator, PI) and filters (notch, low-pass) and replace gains and dynamic blocks;
 * PID replaces PI as well, since it brings its own integral action; notch replaces the
 * existing notches (it proposes one for every resonance); lowpass keeps everything.
 */
export function keptByRedesign(method: TuneMethod): (b: Block) => boolean {
  switch (method) {
    case 'lowpass': return () => true;
    case 'notch': return (b) => b.kind !== 'notch';
    default:
      return (b) => b.kind === 'integrator' || b.kind === 'notch' || b.kind === 'lowpass1' || b.kind === 'lowpass2' || (b.kind === 'pi' && method !== 'pid');
  }
}

/** Checks option values (positive, in range); throws UserError naming the option. */
export function checkOptions(o: TuneOptions): void {
  const pos = (v: number | null | undefined, name: string) => {
    if (v != null && !(v > 0 && Number.isFinite(v))) throw new UserError(`${name} must be a number above zero`);
  };
  if (o.pmDeg != null && !(o.pmDeg > 0 && o.pmDeg < 90)) throw new UserError('--pm must be between 0 and 90 deg (exclusive)');
  pos(o.fcRadS, '--fc');
  pos(o.errorConstant?.value, 'the error-constant target');
  if (o.allowDeg != null && !(o.allowDeg >= 0 && o.allowDeg < 45)) throw new UserError('--allow must be between 0 and 45 deg');
  if (o.stages != null && !(Number.isInteger(o.stages) && o.stages >= 1 && o.stages <= 6)) throw new UserError('--stages must be a whole number from 1 to 6');
  if (o.maxStagePhaseDeg != null && !(o.maxStagePhaseDeg >= 10 && o.maxStagePhaseDeg <= 85)) throw new UserError('--max-stage-phase must be between 10 and 85 deg');
  pos(o.lagZeroRatio, '--lag-ratio');
  if (o.lagZeroRatio != null && !(o.lagZeroRatio > 1)) throw new UserError('--lag-ratio must be above 1 (the lag zero sits below the crossover)');
  if (o.zetaMax != null && !(o.zetaMax > 0 && o.zetaMax < 1)) throw new UserError('--zeta-max must be between 0 and 1');
}
