import type { StoreSql } from '../store/queries.js';
import { canonicalJson } from './canonical-json.js';
import type { LoopGraph } from './graph.js';
import { readStoredResult } from './result-shape.js';
import { decodeState } from './state.js';
import type { LoopResult, LoopState } from './types.js';
import type * as EvaluateModule from './evaluate.js';

/** The numerics, loaded on demand. */
export type Evaluator = typeof EvaluateModule;

let evaluator: Promise<Evaluator> | null = null;

/** Loads the analysis side once; callers await it before opening a write transaction (which must stay synchronous). */
export function loadEvaluator(): Promise<Evaluator> {
  evaluator ??= import('./evaluate.js');
  return evaluator;
}

/** A loop analysed in a state other than its latest one (an older revision, or an unsaved edit). */
export interface StateOverride {
  readonly state: LoopState;
  readonly revision: number;
  /** Input hash when the state is a saved revision; null for an unsaved edit (never looked up, never stored). */
  readonly inputHash: string | null;
}

export interface RecheckEnv {
  readonly sql: StoreSql;
  readonly graph: LoopGraph;
  /** Needed only when some result is not fresh. */
  readonly ev: Evaluator | null;
  readonly computedAt: string;
  /** Store new results (false for what-if). */
  readonly store: boolean;
  readonly overrides?: ReadonlyMap<number, StateOverride>;
  /** Loops whose stored results must not be used (what-if dependants, forced rechecks). */
  readonly recompute?: ReadonlySet<number>;
  /** Counts the loops actually analysed. */
  readonly counter?: { analysed: number };
}

/** The revision and input hash a loop's result is keyed by in this recheck (hash null: unsaved). */
function key(env: RecheckEnv, id: number): { revision: number; hash: string | null } {
  const ov = env.overrides?.get(id);
  if (ov) return { revision: ov.revision, hash: ov.inputHash };
  return { revision: env.graph.head(id).number, hash: env.graph.inputHash(id) };
}

/**
 * The stored result of a loop when it is fresh and readable, else null. No
 * numerics. A row this build cannot read (an older layout) counts as stale and
 * its loop id goes into `unreadable`, so the fresh result replaces it.
 */
export function storedResult(env: RecheckEnv, id: number, unreadable?: Set<number>): LoopResult | null {
  if (env.recompute?.has(id)) return null;
  const k = key(env, id);
  if (k.hash === null) return null;
  const row = env.sql.result(id, k.revision, k.hash);
  if (!row) return null;
  const r = readStoredResult(row);
  if (r === null) unreadable?.add(id);
  return r;
}

/**
 * Fresh results of `ids`: stored ones where their input hash matches, new ones
 * (analysed, and stored when env.store) otherwise. Inner loops are handled
 * first, since an outer loop's `sep` requirement reads its inner loop's result.
 */
export function recheck(env: RecheckEnv, ids: Iterable<number>): Map<number, LoopResult> {
  const { graph } = env;
  const results = new Map<number, LoopResult>();
  const unreadable = new Set<number>();
  let cascade: InstanceType<Evaluator['Cascade']> | null = null;
  for (const id of graph.withInnerChains(ids)) {
    const stored = storedResult(env, id, unreadable);
    if (stored !== null) {
      results.set(id, stored);
      continue;
    }
    if (env.ev === null) throw new Error('recheck: analysis needed but not loaded');
    cascade ??= new env.ev.Cascade((x) => ({ ref: graph.ref(x), state: stateOf(env, x), innerId: graph.loop(x).inner_loop_id }));
    const k = key(env, id);
    const innerId = graph.loop(id).inner_loop_id;
    const c = cascade;
    const r = env.ev.evaluateLoop({
      id,
      ref: graph.ref(id),
      revision: k.revision,
      inputHash: k.hash ?? 'unsaved',
      computedAt: env.computedAt,
      unit: graph.unit,
      cascade: c,
      inner: innerId === null ? null : results.get(innerId)!,
      innerVariant: (v) => (innerId === null ? v : c.resolve(innerId, v)),
    });
    if (env.counter) env.counter.analysed++;
    if (env.store && k.hash !== null) {
      const row = { loop_id: id, revision: k.revision, input_hash: k.hash, status: r.status, result_json: canonicalJson(r), computed_at: env.computedAt };
      if (unreadable.has(id)) env.sql.replaceResult(row);
      else env.sql.insertResult(row);
    }
    results.set(id, r);
  }
  return results;
}

function stateOf(env: RecheckEnv, id: number): LoopState {
  const ov = env.overrides?.get(id);
  if (ov) return ov.state;
  const row = env.sql.revision(id, env.graph.head(id).number);
  if (!row) throw new Error(`revision ${env.graph.head(id).number} of ${env.graph.ref(id)} vanished`);
  return decodeState(row.state_json);
}
