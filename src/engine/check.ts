import type { LoopStatus } from '../model/requirements.js';
import { findLoop, machineGraph, type Core } from './core.js';
import { loadEvaluator, recheck, storedResult, type RecheckEnv } from './recheck.js';
import type { CheckReport, LoopResult } from './types.js';

const SEVERITY: readonly LoopStatus[] = ['pass', 'fail', 'unstable', 'error'];

/** The worse of two statuses (error > unstable > fail > pass). */
export function worse(a: LoopStatus, b: LoopStatus): LoopStatus {
  return SEVERITY.indexOf(a) >= SEVERITY.indexOf(b) ? a : b;
}

function isReadOnlyError(e: unknown): boolean {
  return e instanceof Error && /SQLITE_READONLY|readonly database/i.test(`${(e as { code?: string }).code ?? ''} ${e.message}`);
}

/**
 * Fresh results of some loops (default: all). Stored results whose input hash
 * still matches are used as they are; only stale loops are analysed (loading
 * the numerics only then) and their results stored. A store we may not write
 * to is still checked, just without saving results.
 */
export async function checkLoops(core: Core, refs: readonly string[] | null, force = false): Promise<CheckReport> {
  const counter = { analysed: 0 };
  // One read transaction: a consistent snapshot, and one lock instead of one per statement.
  const first = core.sql.db.transaction(() => {
    const graph = machineGraph(core);
    const ids = refs === null || refs.length === 0 ? [...graph.loops.keys()] : [...new Set(refs.map((r) => findLoop(core, r).id))];
    const env: RecheckEnv = { sql: core.sql, graph, ev: null, computedAt: core.now(), store: true, counter, ...(force ? { recompute: new Set(graph.loops.keys()) } : {}) };
    // Fast path: every result (and those of the loops inside) fresh in the store; one lookup each.
    let fresh: Map<number, LoopResult> | null = force ? null : new Map();
    for (const id of force ? [] : graph.withInnerChains(ids)) {
      const r = storedResult(env, id);
      if (r === null) {
        fresh = null;
        break;
      }
      fresh!.set(id, r);
    }
    return { ids, env, fresh };
  }).deferred();
  const { ids, env } = first;
  let results = first.fresh;
  if (results === null) {
    const ev = await loadEvaluator();
    try {
      // Re-read inside the write transaction: another process may have changed loops meanwhile.
      results = core.sql.writeTx(() => recheck({ ...env, graph: machineGraph(core), ev }, ids));
    } catch (e) {
      if (!isReadOnlyError(e)) throw e;
      counter.analysed = 0;
      results = recheck({ ...env, ev, store: false }, ids);
    }
  }
  const loops = ids.map((id) => results.get(id)!);
  const counts = { pass: 0, fail: 0, unstable: 0, error: 0 };
  let status: LoopStatus = 'pass';
  for (const r of loops) {
    counts[r.status]++;
    status = worse(status, r.status);
  }
  return { loops, status, counts, reanalysed: counter.analysed };
}
