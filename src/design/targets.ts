import type { Requirement } from '../model/requirements.js';
import type { TransferFunction } from '../model/tf.js';
import { errorConstants } from '../analysis/error-constants.js';

/** Which error constant a requirement or option names: position, velocity, acceleration. */
export type ErrorConstantKind = 'kp' | 'kv' | 'ka';

/** "The loop's error constant must be at least value." */
export interface ErrorConstantTarget {
  readonly kind: ErrorConstantKind;
  readonly value: number;
}

const ORDER: Record<ErrorConstantKind, number> = { kp: 0, kv: 1, ka: 2 };
export const ERROR_CONSTANT_UNIT: Record<ErrorConstantKind, string> = { kp: '', kv: '1/s', ka: '1/s^2' };

/** lim s->0 s^n F(s) for n = 0, 1, 2 (kp, kv, ka), signed; +-Infinity above that type, 0 below. */
export function errorConstantOf(f: TransferFunction, kind: ErrorConstantKind): number {
  return errorConstants(f)[kind];
}

/** The error-constant limits among requirements (`kp>=`, `kv>=`, `ka>=`). */
export function errorConstantTargets(reqs: readonly Requirement[]): ErrorConstantTarget[] {
  const out: ErrorConstantTarget[] = [];
  for (const r of reqs) {
    if ((r.metric === 'kp' || r.metric === 'kv' || r.metric === 'ka') && r.op === '>=') out.push({ kind: r.metric, value: r.value });
  }
  return out;
}

/** The gain that error constants ask for, or why no gain can give them. */
export type GainFromConstants =
  | { readonly ok: true; readonly k: number; readonly binding: ErrorConstantTarget | null; readonly perUnitGain: number | null }
  | { readonly ok: false; readonly reason: string };

/**
 * The smallest gain K (in magnitude) such that K·F meets every error-constant
 * target: K = value / (constant of F). A target F already meets with any gain
 * (more integrators than needed) sets no limit; one F cannot meet at all (too
 * few integrators) is refused with the reason. Without binding targets K = fallbackK.
 */
export function gainForErrorConstants(f: TransferFunction, targets: readonly ErrorConstantTarget[], fallbackK: number): GainFromConstants {
  let best: { k: number; t: ErrorConstantTarget; c: number } | null = null;
  for (const t of targets) {
    const c = errorConstantOf(f, t.kind);
    if (!Number.isFinite(c)) continue;
    if (c === 0) {
      const type = errorConstants(f).systemType;
      return { ok: false, reason: `${t.kind} >= ${t.value} needs a loop of type ${ORDER[t.kind]} or higher, but plant and kept blocks are type ${type}: add an integrator (an 'int' or 'pi' block) or use method pid` };
    }
    const k = t.value / c;
    if (best === null || Math.abs(k) > Math.abs(best.k)) best = { k, t, c };
  }
  if (best === null) return { ok: true, k: fallbackK, binding: null, perUnitGain: null };
  return { ok: true, k: best.k, binding: best.t, perUnitGain: best.c };
}
