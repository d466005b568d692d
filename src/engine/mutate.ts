import { UserError } from '../model/errors.js';
import type { LoopRow, RevisionHeadRow, RevisionRow } from '../store/rows.js';
import { axisGraph, findLoop, revisionInfo, type Core } from './core.js';
import { ConflictError } from './errors.js';
import { checkName, loopRef, parseLoopRef } from './names.js';
import { loadEvaluator, recheck, type Evaluator } from './recheck.js';
import { decodeState, encodeState, initialState } from './state.js';
import type { ChangeOptions, ChangeOutcome, LoopState, PlantVariant, RevisionKind } from './types.js';

/**
 * The write path. Every change: (inputs already parsed and checked outside) one
 * IMMEDIATE transaction that reads the latest revision, refuses a stale base,
 * builds the new state, appends the revision, and rechecks the loop and every
 * loop built on it. Anything thrown inside rolls the whole change back.
 */

/** A change to a loop's state; `apply` may throw UserError to refuse it, and may name the kind from what it changed. */
export interface ChangeSpec {
  readonly kind: RevisionKind;
  apply(latest: LoopState, ref: string): { state: LoopState; summary: string; kind?: RevisionKind };
}

function checkBase(ref: string, head: RevisionHeadRow, opts: ChangeOptions): number {
  if (opts.base === undefined) return head.number;
  if (!Number.isInteger(opts.base) || opts.base < 1 || opts.base > head.number) {
    throw new UserError(`${ref} has no revision ${opts.base} to base a change on; its latest is ${head.number}`);
  }
  if (opts.base !== head.number && opts.force !== true) {
    throw new ConflictError(ref, opts.base, head.number, head.author, head.created_at, head.note);
  }
  return opts.base;
}

/**
 * Appends a revision. Its check hash is the input hash its own result will be
 * stored under by the recheck that follows in the same transaction: the loop's
 * inputs besides its own state (inner loops, sample rate, unit, analysis
 * version) do not move with this change, so the graph read before it gives it.
 */
function appendRevision(core: Core, loop: LoopRow, number: number, parent: number | null, kind: RevisionKind, state: LoopState, summary: string, opts: ChangeOptions): RevisionRow {
  const enc = encodeState(state);
  const row: RevisionRow = {
    loop_id: loop.id, number, parent, kind, author: core.author(opts.author), created_at: core.now(),
    note: opts.note ?? '', summary, state_json: enc.json, state_hash: enc.stateHash, dynamics_hash: enc.dynamicsHash,
    check_hash: axisGraph(core, loop.axis_id).inputHash(loop.id, enc.stateHash),
  };
  core.sql.insertRevision(row);
  return row;
}

/** Rechecks a loop and every loop built on it (inside the caller's transaction); the new revision carries the loop's status. */
function recheckFrom(core: Core, loop: LoopRow, row: RevisionRow, ev: Evaluator): ChangeOutcome {
  const graph = axisGraph(core, loop.axis_id);
  const ids = [loop.id, ...graph.dependants(loop.id)];
  const results = recheck({ sql: core.sql, graph, ev, computedAt: core.now(), store: true }, ids);
  const own = results.get(loop.id)!;
  // The revision names this result as its status then; a mismatch would silently lose it.
  if (own.inputHash !== row.check_hash) throw new Error(`${own.loop}: check hash of revision ${row.number} does not match its result`);
  return { revision: revisionInfo(loop, { ...row, status_then: own.status }), results: ids.map((id) => results.get(id)!) };
}

/** Applies one change to an existing loop. */
export async function applyChange(core: Core, ref: string, opts: ChangeOptions, spec: ChangeSpec): Promise<ChangeOutcome> {
  const ev = await loadEvaluator();
  return core.sql.writeTx(() => {
    const loop = findLoop(core, ref);
    const head = core.sql.head(loop.id);
    if (!head) throw new Error(`${ref} has no revision`);
    const parent = checkBase(ref, head, opts);
    const { state, summary, kind } = spec.apply(decodeState(head.state_json), ref);
    const row = appendRevision(core, loop, head.number + 1, parent, kind ?? spec.kind, state, summary, opts);
    return recheckFrom(core, loop, row, ev);
  });
}

export interface NewLoop {
  readonly plant: PlantVariant;
  readonly variant: string;
  readonly inner: string | null;
  readonly sampleRateHz: number | null;
}

/** Creates a loop with revision 1 and checks it. */
export async function createLoop(core: Core, ref: string, spec: NewLoop, opts: ChangeOptions): Promise<ChangeOutcome> {
  const { axis, loop: name } = parseLoopRef(ref);
  checkName(spec.variant, 'variant');
  if (spec.sampleRateHz !== null && !(Number.isFinite(spec.sampleRateHz) && spec.sampleRateHz > 0)) {
    throw new UserError(`${ref}: the sample rate must be a frequency above zero, e.g. 8kHz`);
  }
  const ev = await loadEvaluator();
  return core.sql.writeTx(() => {
    const axisRow = core.sql.axisByName(axis);
    if (!axisRow) throw new UserError(`no axis '${axis}' in this store; add it first with 'loopledger axis add ${axis}'`);
    if (core.sql.loopByName(axis, name)) throw new UserError(`loop ${ref} already exists; change it with plant set, spec or comp set`);
    let innerId: number | null = null;
    if (spec.inner !== null) {
      const innerRef = spec.inner.includes('/') ? spec.inner : loopRef(axis, spec.inner);
      const inner = findLoop(core, innerRef);
      if (inner.axis_id !== axisRow.id) throw new UserError(`${ref}: the inner loop must be on the same axis; ${innerRef} is on axis ${inner.axis}`);
      innerId = inner.id;
    }
    const id = core.sql.insertLoop(axisRow.id, name, innerId, spec.sampleRateHz);
    const loop = findLoop(core, ref);
    if (loop.id !== id) throw new Error('loop id mismatch after insert');
    const state = initialState(spec.variant, spec.plant);
    const row = appendRevision(core, loop, 1, null, 'create', state, `create: plant ${spec.variant} ${spec.plant.text}`, opts);
    return recheckFrom(core, loop, row, ev);
  });
}
