import type { FreqUnit } from '../model/units.js';
import { canonicalJson } from './canonical-json.js';
import type { Cascade, CascadeLoop } from './cascade.js';
import type { LoopResult } from './types.js';
import type * as EvaluateModule from './evaluate.js';

/**
 * One unit of recheck work that can run on any thread: loops of one cascade tree
 * (an innermost loop and everything built on it) with every state they need, so
 * the thread that runs it reads no store. The serial recheck and the worker pool
 * both evaluate loops through `evaluateOne`, which is why their results agree
 * byte for byte.
 */

/** The numerics, loaded on demand. */
export type Evaluator = typeof EvaluateModule;

/** What the result of one loop is keyed by. */
export interface TaskLoopKey {
  readonly id: number;
  readonly revision: number;
  /** The input hash, or 'unsaved' for a state that is not a saved revision. */
  readonly inputHash: string;
}

export interface RecheckTask {
  /** Every loop the analysed ones need (themselves and all loops inside them), with the state to use. */
  readonly loops: readonly (CascadeLoop & { readonly id: number })[];
  /** Loops to analyse, inner before outer. */
  readonly analyse: readonly TaskLoopKey[];
  /** Fresh stored results of inner loops that are not analysed here (an outer loop's `sep` reads them). */
  readonly known: readonly { readonly id: number; readonly result: LoopResult }[];
  readonly computedAt: string;
  readonly unit: FreqUnit;
  /** Write each result's stored form too (the thread that analyses also serialises). */
  readonly json: boolean;
}

/** A loop's new result with its stored form. */
export interface Computed {
  readonly id: number;
  readonly result: LoopResult;
  /** canonicalJson(result), the result row's JSON, when asked for. */
  readonly json: string | null;
}

/** Analyses one loop of a cascade; `inner` is the fresh result of its inner loop (null without one). */
export function evaluateOne(ev: Evaluator, cascade: Cascade, ref: string, k: TaskLoopKey, innerId: number | null, inner: LoopResult | null, computedAt: string, unit: FreqUnit, json: boolean): Computed {
  const result = ev.evaluateLoop({
    id: k.id,
    ref,
    revision: k.revision,
    inputHash: k.inputHash,
    computedAt,
    unit,
    cascade,
    inner,
    innerVariant: (v) => (innerId === null ? v : cascade.resolve(innerId, v)),
  });
  return { id: k.id, result, json: json ? canonicalJson(result) : null };
}

/** Runs a task: its loops analysed in order, inner results taken from the task or from this run. */
export function runTask(ev: Evaluator, task: RecheckTask): Computed[] {
  const loops = new Map(task.loops.map((l) => [l.id, l]));
  const cascade = new ev.Cascade((id) => {
    const l = loops.get(id);
    if (l === undefined) throw new Error(`recheck task: loop id ${id} was not sent with the task`);
    return l;
  });
  const results = new Map<number, LoopResult>(task.known.map((k) => [k.id, k.result]));
  const out: Computed[] = [];
  for (const k of task.analyse) {
    const l = loops.get(k.id);
    if (l === undefined) throw new Error(`recheck task: loop id ${k.id} was not sent with the task`);
    const inner = l.innerId === null ? null : results.get(l.innerId);
    if (inner === undefined) throw new Error(`recheck task: no result of the loop inside ${l.ref}`);
    const c = evaluateOne(ev, cascade, l.ref, k, l.innerId, inner, task.computedAt, task.unit, task.json);
    results.set(k.id, c.result);
    out.push(c);
  }
  return out;
}
