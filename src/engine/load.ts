import { UserError } from '../model/errors.js';
import type { StoreSql } from '../store/queries.js';
import { parseCanonical } from './canonical-json.js';
import { checkDump } from './dump-check.js';
import type { LoopDump, MachineDump } from './dump.js';
import { LoopGraph } from './graph.js';
import { loadEvaluator, recheck } from './recheck.js';
import { encodeState } from './state.js';

/** Parses and checks dump text (before any store is opened, so a bad file creates nothing). */
export function readDump(text: string): MachineDump {
  let parsed: unknown;
  try {
    parsed = parseCanonical(text);
  } catch (e) {
    throw new UserError(`dump is not valid JSON (${e instanceof Error ? e.message : String(e)}); nothing was loaded`);
  }
  return checkDump(parsed);
}

/**
 * Loads a checked dump into a new or empty store, in one transaction: the
 * machine settings, every axis and loop, every revision as it was (authors,
 * times, notes kept), then a check of every loop so the store is ready to use.
 */
export async function loadInto(sql: StoreSql, dump: MachineDump, where: string, now: () => Date): Promise<void> {
  const ev = await loadEvaluator();
  sql.writeTx(() => {
    if (!sql.isEmpty()) throw new UserError(`${where} already holds axes; load into a new or empty store; nothing was loaded`);
    sql.putMachine({ name: dump.machine.name, unit: dump.machine.unit, created_at: dump.machine.createdAt });
    for (const a of dump.axes) {
      const axisId = sql.insertAxis({ name: a.name, note: a.note, author: a.author, created_at: a.createdAt });
      const ids = new Map<string, number>();
      const insert = (l: LoopDump): number => {
        const known = ids.get(l.name);
        if (known !== undefined) return known;
        const innerId = l.inner === null ? null : insert(a.loops.find((o) => o.name === l.inner)!);
        const id = sql.insertLoop(axisId, l.name, innerId, l.sampleRateHz);
        ids.set(l.name, id);
        for (const r of l.revisions) {
          const enc = encodeState(r.state);
          sql.insertRevision({
            loop_id: id, number: r.number, parent: r.parent, kind: r.kind, author: r.author, created_at: r.time,
            note: r.note, summary: r.summary, state_json: enc.json, state_hash: enc.stateHash, dynamics_hash: enc.dynamicsHash,
            // A dump holds no results: no revision was checked when it was saved here.
            check_hash: null,
          });
        }
        return id;
      };
      for (const l of a.loops) insert(l);
    }
    const graph = new LoopGraph(sql.loops(), sql.heads(), dump.machine.unit);
    recheck({ sql, graph, ev, computedAt: now().toISOString(), store: true }, graph.loops.keys());
  });
}
