import { axisGraph, findLoop, type Core } from './core.js';
import { editState, parseEdit } from './edit.js';
import { loadEvaluator, recheck, type StateOverride } from './recheck.js';
import { decodeState } from './state.js';
import type { LoopState, WhatIfEdit, WhatIfResult } from './types.js';

/**
 * Evaluates an unsaved edit of a loop (compensator and/or the complete list of
 * requirements, applied exactly as `applyEdit` would save it) and the outer
 * loops it would affect. Reads one consistent snapshot and writes nothing: the
 * edited loop and its dependants are analysed as overrides whose results are
 * never looked up or stored.
 */
export async function whatIf(core: Core, ref: string, edit: WhatIfEdit): Promise<WhatIfResult> {
  const unit = core.unit();
  const parsed = await parseEdit(edit, unit);
  const ev = await loadEvaluator();
  const read = core.sql.db.transaction(() => {
    const loop = findLoop(core, ref);
    const graph = axisGraph(core, loop.axis_id);
    const headState = (id: number) => decodeState(core.sql.revision(id, graph.head(id).number)!.state_json);
    const state: LoopState = editState(headState(loop.id), parsed, unit);
    const deps = graph.dependants(loop.id);
    const overrides = new Map<number, StateOverride>([[loop.id, { state, revision: graph.head(loop.id).number, inputHash: null }]]);
    for (const d of deps) overrides.set(d, { state: headState(d), revision: graph.head(d).number, inputHash: null });
    const results = recheck({ sql: core.sql, graph, ev, computedAt: core.now(), store: false, overrides }, [loop.id, ...deps]);
    return { loop: results.get(loop.id)!, dependants: deps.map((d) => results.get(d)!) };
  });
  return read.deferred();
}
