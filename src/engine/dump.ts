import type { Core } from './core.js';
import { prettyJson } from './canonical-json.js';
import { decodeState } from './state.js';
import type { Revision, RevisionKind } from './types.js';

/** Identifies a dump file and its layout version. */
export const DUMP_FORMAT = 'loopledger-machine';
export const DUMP_FORMAT_VERSION = 1;

/** The dump document: the whole machine and every revision, no database ids, no derived results. */
export interface MachineDump {
  readonly format: string;
  readonly formatVersion: number;
  readonly machine: { readonly name: string; readonly unit: 'hz' | 'rad'; readonly createdAt: string };
  readonly axes: readonly AxisDump[];
}

export interface AxisDump {
  readonly name: string;
  readonly note: string;
  readonly author: string;
  readonly createdAt: string;
  readonly loops: readonly LoopDump[];
}

export interface LoopDump {
  readonly name: string;
  /** Name of the inner loop on the same axis, or null. */
  readonly inner: string | null;
  readonly sampleRateHz: number | null;
  readonly revisions: readonly RevisionDump[];
}

/** A revision as `Revision`, minus the loop name (the enclosing loop says it) and its status (a dump holds no results). */
export type RevisionDump = Omit<Revision, 'loop' | 'status'>;

/**
 * The whole machine as readable JSON: keys sorted, two-space indent, number
 * arrays on one line, axes and loops by name, revisions oldest first. The same
 * store always gives the same bytes, so a dump can live in version control.
 */
export function dumpMachine(core: Core): string {
  const m = core.sql.machine();
  if (!m) throw new Error('dump: store has no machine row');
  const loops = core.sql.loops();
  const nameOf = new Map(loops.map((l) => [l.id, l.name]));
  const axes: AxisDump[] = core.sql.axes().map((a) => ({
    name: a.name, note: a.note, author: a.author, createdAt: a.created_at,
    loops: loops.filter((l) => l.axis_id === a.id).map((l) => ({
      name: l.name,
      inner: l.inner_loop_id === null ? null : nameOf.get(l.inner_loop_id)!,
      sampleRateHz: l.sample_rate_hz,
      revisions: core.sql.history(l.id).map((r) => ({
        number: r.number, parent: r.parent, kind: r.kind as RevisionKind, author: r.author,
        time: r.created_at, note: r.note, summary: r.summary, state: decodeState(r.state_json),
      })),
    })),
  }));
  const doc: MachineDump = { format: DUMP_FORMAT, formatVersion: DUMP_FORMAT_VERSION, machine: { name: m.name, unit: m.unit, createdAt: m.created_at }, axes };
  return prettyJson(doc);
}
