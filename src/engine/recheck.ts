import type { StoreSql } from '../store/queries.js';
import { canonicalJson } from './canonical-json.js';
import type { LoopGraph } from './graph.js';
import { analysisPool } from './pool.js';
import { poolSettings } from './pool-setup.js';
import { evaluateOne, type Computed, type Evaluator, type RecheckTask, type TaskLoopKey } from './pool-task.js';
import { readStoredResult } from './result-shape.js';
import { decodeState } from './state.js';
import type { LoopResult, LoopState } from './types.js';

export type { Evaluator } from './pool-task.js';

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
  return env.recompute?.has(id) ? null : storedUnder(env, id, key(env, id), unreadable);
}

function storedUnder(env: RecheckEnv, id: number, k: { revision: number; hash: string | null }, unreadable?: Set<number>): LoopResult | null {
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
 * Many stale loops (a full recheck) are analysed on the worker pool, one task
 * per cascade tree; results and rows are the same either way, and rows are
 * written here, in this transaction, in the same order.
 */
export function recheck(env: RecheckEnv, ids: Iterable<number>): Map<number, LoopResult> {
  const results = new Map<number, LoopResult>();
  const unreadable = new Set<number>();
  // Keys of the stale loops, worked out once (each is a hash over the loop's inputs).
  const keys = new Map<number, { revision: number; hash: string | null }>();
  for (const id of env.graph.withInnerChains(ids)) {
    const k = key(env, id);
    const stored = env.recompute?.has(id) ? null : storedUnder(env, id, k, unreadable);
    if (stored !== null) results.set(id, stored);
    else keys.set(id, k);
  }
  const stale = [...keys.keys()];
  if (stale.length === 0) return results;
  if (env.ev === null) throw new Error('recheck: analysis needed but not loaded');
  const taskKey = (id: number): TaskLoopKey => ({ id, revision: keys.get(id)!.revision, inputHash: keys.get(id)!.hash ?? 'unsaved' });
  const pool = stale.length >= poolSettings().minLoops ? analysisPool() : null;
  const computed = pool !== null ? pool.run(tasksFor(env, stale, results, taskKey), env.ev) : analyseHere(env, env.ev, stale, results, taskKey);
  for (const id of stale) {
    const c = computed.get(id);
    if (c === undefined) throw new Error(`recheck: no result for ${env.graph.ref(id)}`);
    if (env.counter) env.counter.analysed++;
    const k = keys.get(id)!;
    if (env.store && k.hash !== null) {
      const row = { loop_id: id, revision: k.revision, input_hash: k.hash, status: c.result.status, result_json: c.json ?? canonicalJson(c.result), computed_at: env.computedAt };
      if (unreadable.has(id)) env.sql.replaceResult(row);
      else env.sql.insertResult(row);
    }
    results.set(id, c.result);
  }
  return results;
}

/** Analyses stale loops (inner before outer) on this thread; `fresh` holds the stored results. */
function analyseHere(env: RecheckEnv, ev: Evaluator, stale: readonly number[], fresh: ReadonlyMap<number, LoopResult>, taskKey: (id: number) => TaskLoopKey): Map<number, Computed> {
  const { graph } = env;
  const cascade = new ev.Cascade((x) => ({ ref: graph.ref(x), state: stateOf(env, x), innerId: graph.loop(x).inner_loop_id }));
  const out = new Map<number, Computed>();
  for (const id of stale) {
    const innerId = graph.loop(id).inner_loop_id;
    const inner = innerId === null ? null : (out.get(innerId)?.result ?? fresh.get(innerId)!);
    out.set(id, evaluateOne(ev, cascade, graph.ref(id), taskKey(id), innerId, inner, env.computedAt, graph.unit, env.store));
  }
  return out;
}

/** The innermost loop of a loop's cascade: stale loops with the same one form one task. */
function innermost(graph: LoopGraph, id: number): number {
  let x = id;
  for (let inner = graph.loop(x).inner_loop_id; inner !== null; inner = graph.loop(x).inner_loop_id) x = inner;
  return x;
}

/** One task per cascade tree, holding the states of its loops and the stored results of fresh inner loops. */
function tasksFor(env: RecheckEnv, stale: readonly number[], fresh: ReadonlyMap<number, LoopResult>, taskKey: (id: number) => TaskLoopKey): RecheckTask[] {
  const { graph } = env;
  const trees = new Map<number, number[]>();
  for (const id of stale) {
    const root = innermost(graph, id);
    const list = trees.get(root);
    if (list) list.push(id);
    else trees.set(root, [id]);
  }
  return [...trees.values()].map((ids): RecheckTask => {
    const analysed = new Set(ids);
    const known = new Map<number, LoopResult>();
    for (const id of ids) {
      const innerId = graph.loop(id).inner_loop_id;
      if (innerId !== null && !analysed.has(innerId)) known.set(innerId, fresh.get(innerId)!);
    }
    return {
      loops: graph.withInnerChains(ids).map((x) => ({ id: x, ref: graph.ref(x), state: stateOf(env, x), innerId: graph.loop(x).inner_loop_id })),
      analyse: ids.map(taskKey),
      known: [...known].map(([id, result]) => ({ id, result })),
      computedAt: env.computedAt,
      unit: graph.unit,
      json: env.store,
    };
  });
}
function stateOf(env: RecheckEnv, id: number): LoopState {
  const ov = env.overrides?.get(id);
  if (ov) return ov.state;
  const row = env.sql.revision(id, env.graph.head(id).number);
  if (!row) throw new Error(`revision ${env.graph.head(id).number} of ${env.graph.ref(id)} vanished`);
  return decodeState(row.state_json);
}
