import os from 'node:os';
import { UserError } from '../model/errors.js';
import type { FreqUnit } from '../model/units.js';
import type { StoreSql } from '../store/queries.js';
import type { LoopStatus } from '../model/requirements.js';
import type { LoopRow, RevisionHeadRow } from '../store/rows.js';
import { LoopGraph } from './graph.js';
import { loopRef, parseLoopRef } from './names.js';
import type { RevisionInfo, RevisionKind } from './types.js';

/** What every engine module needs: the statements, the clock and the default author. */
export interface Core {
  readonly sql: StoreSql;
  readonly path: string;
  readonly schemaVersion: number;
  /** The store's display unit. */
  unit(): FreqUnit;
  /** The given author, else the store's default, else the OS user. */
  author(given?: string): string;
  /** Current time, ISO-8601 UTC. */
  now(): string;
}

/** The login name of whoever runs this process. */
export function osUser(): string {
  try {
    const u = os.userInfo().username;
    if (u !== '') return u;
  } catch {
    // No passwd entry (some containers): fall back to the environment.
  }
  return process.env.USER ?? process.env.USERNAME ?? 'unknown';
}

/** The loop row of "AXIS/LOOP", or a UserError saying which part is missing. */
export function findLoop(core: Core, ref: string): LoopRow {
  const { axis, loop } = parseLoopRef(ref);
  const row = core.sql.loopByName(axis, loop);
  if (row) return row;
  if (!core.sql.axisByName(axis)) throw new UserError(`no axis '${axis}' in this store; 'loopledger axis list' shows the axes`);
  throw new UserError(`no loop '${ref}' in this store; 'loopledger loop list' shows the loops`);
}

/** Loops and latest revisions of one axis (cascades never cross axes). */
export function axisGraph(core: Core, axisId: number): LoopGraph {
  return new LoopGraph(core.sql.loopsOfAxis(axisId), core.sql.headsOfAxis(axisId), core.unit());
}

/** Loops and latest revisions of the whole machine. */
export function machineGraph(core: Core): LoopGraph {
  return new LoopGraph(core.sql.loops(), core.sql.heads(), core.unit());
}

const STATUSES: readonly string[] = ['pass', 'fail', 'unstable', 'error'] satisfies LoopStatus[];

/** The public form of a revision row; `status_then` comes with rows read back, or is given for a new one. */
export function revisionInfo(loop: LoopRow, r: RevisionHeadRow & { readonly status_then?: string | null }): RevisionInfo {
  const status = r.status_then ?? null;
  return {
    loop: loopRef(loop.axis, loop.name),
    number: r.number,
    parent: r.parent,
    kind: r.kind as RevisionKind,
    author: r.author,
    time: r.created_at,
    note: r.note,
    summary: r.summary,
    status: status !== null && STATUSES.includes(status) ? (status as LoopStatus) : null,
  };
}
