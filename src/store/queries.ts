import type Database from 'better-sqlite3';
import type { AxisRow, LoopRow, MachineRow, ResultRow, RevisionReadRow, RevisionRow, RevisionStateRow } from './rows.js';

/** Revision columns without the state, plus the status of the result computed with the save ("status then"). */
const HEAD_COLUMNS = 'r.loop_id, r.number, r.parent, r.kind, r.author, r.created_at, r.note, r.summary, r.state_hash, r.dynamics_hash, r.check_hash, '
  + '(SELECT x.status FROM result x WHERE x.loop_id = r.loop_id AND x.revision = r.number AND x.input_hash = r.check_hash) AS status_then';
const LOOP_SELECT = 'SELECT l.id, l.axis_id, a.name AS axis, l.name, l.inner_loop_id, l.sample_rate_hz FROM loop l JOIN axis a ON a.id = l.axis_id';

/**
 * Every SQL statement of loopledger, prepared once per connection. Only reads
 * and appends: history rows are never updated or deleted (the one replace is of
 * an unreadable cached result, see replaceResult).
 */
export class StoreSql {
  private readonly cache = new Map<string, Database.Statement>();

  constructor(readonly db: Database.Database) {}

  private st(sql: string): Database.Statement {
    let s = this.cache.get(sql);
    if (s === undefined) {
      s = this.db.prepare(sql);
      this.cache.set(sql, s);
    }
    return s;
  }

  /** Runs fn in an IMMEDIATE transaction (takes the write lock before reading). */
  writeTx<T>(fn: () => T): T {
    return this.db.transaction(fn).immediate();
  }

  /** PRAGMA data_version: moves when another connection commits. */
  dataVersion(): number {
    return this.db.pragma('data_version', { simple: true }) as number;
  }

  machine(): MachineRow | undefined {
    return this.st('SELECT name, unit, created_at FROM machine WHERE id = 1').get() as MachineRow | undefined;
  }

  /** Inserts or (only for an empty store being loaded) replaces the one machine row. */
  putMachine(m: MachineRow): void {
    this.st('INSERT INTO machine (id, name, unit, created_at) VALUES (1, ?, ?, ?) ON CONFLICT (id) DO UPDATE SET name = excluded.name, unit = excluded.unit, created_at = excluded.created_at')
      .run(m.name, m.unit, m.created_at);
  }

  axes(): AxisRow[] {
    return this.st('SELECT id, name, note, author, created_at FROM axis ORDER BY name').all() as AxisRow[];
  }

  axisByName(name: string): AxisRow | undefined {
    return this.st('SELECT id, name, note, author, created_at FROM axis WHERE name = ?').get(name) as AxisRow | undefined;
  }

  insertAxis(a: Omit<AxisRow, 'id'>): number {
    return Number(this.st('INSERT INTO axis (name, note, author, created_at) VALUES (?, ?, ?, ?)').run(a.name, a.note, a.author, a.created_at).lastInsertRowid);
  }

  loops(): LoopRow[] {
    return this.st(`${LOOP_SELECT} ORDER BY a.name, l.name`).all() as LoopRow[];
  }

  loopsOfAxis(axisId: number): LoopRow[] {
    return this.st(`${LOOP_SELECT} WHERE l.axis_id = ? ORDER BY l.name`).all(axisId) as LoopRow[];
  }

  loopByName(axis: string, name: string): LoopRow | undefined {
    return this.st(`${LOOP_SELECT} WHERE a.name = ? AND l.name = ?`).get(axis, name) as LoopRow | undefined;
  }

  insertLoop(axisId: number, name: string, innerId: number | null, sampleRateHz: number | null): number {
    return Number(this.st('INSERT INTO loop (axis_id, name, inner_loop_id, sample_rate_hz) VALUES (?, ?, ?, ?)').run(axisId, name, innerId, sampleRateHz).lastInsertRowid);
  }

  /** The latest revision of every loop (without state). */
  heads(): RevisionReadRow[] {
    return this.st(`SELECT ${HEAD_COLUMNS} FROM revision r WHERE r.number = (SELECT max(number) FROM revision WHERE loop_id = r.loop_id)`).all() as RevisionReadRow[];
  }

  /** The latest revision of every loop of one axis (without state). */
  headsOfAxis(axisId: number): RevisionReadRow[] {
    return this.st(`SELECT ${HEAD_COLUMNS} FROM revision r WHERE r.loop_id IN (SELECT id FROM loop WHERE axis_id = ?) AND r.number = (SELECT max(number) FROM revision WHERE loop_id = r.loop_id)`)
      .all(axisId) as RevisionReadRow[];
  }

  head(loopId: number): RevisionStateRow | undefined {
    return this.st(`SELECT ${HEAD_COLUMNS}, r.state_json FROM revision r WHERE r.loop_id = ? ORDER BY r.number DESC LIMIT 1`).get(loopId) as RevisionStateRow | undefined;
  }

  revision(loopId: number, number: number): RevisionStateRow | undefined {
    return this.st(`SELECT ${HEAD_COLUMNS}, r.state_json FROM revision r WHERE r.loop_id = ? AND r.number = ?`).get(loopId, number) as RevisionStateRow | undefined;
  }

  /** A loop's revisions oldest first, without state. */
  log(loopId: number): RevisionReadRow[] {
    return this.st(`SELECT ${HEAD_COLUMNS} FROM revision r WHERE r.loop_id = ? ORDER BY r.number`).all(loopId) as RevisionReadRow[];
  }

  /** A loop's revisions oldest first, with state (dump). */
  history(loopId: number): RevisionStateRow[] {
    return this.st(`SELECT ${HEAD_COLUMNS}, r.state_json FROM revision r WHERE r.loop_id = ? ORDER BY r.number`).all(loopId) as RevisionStateRow[];
  }

  insertRevision(r: RevisionRow): void {
    this.st('INSERT INTO revision (loop_id, number, parent, kind, author, created_at, note, summary, state_json, state_hash, dynamics_hash, check_hash) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)')
      .run(r.loop_id, r.number, r.parent, r.kind, r.author, r.created_at, r.note, r.summary, r.state_json, r.state_hash, r.dynamics_hash, r.check_hash);
  }

  result(loopId: number, revision: number, inputHash: string): ResultRow | undefined {
    return this.st('SELECT loop_id, revision, input_hash, status, result_json, computed_at FROM result WHERE loop_id = ? AND revision = ? AND input_hash = ?')
      .get(loopId, revision, inputHash) as ResultRow | undefined;
  }

  /** Stores a result; the same inputs always give the same result, so a repeat is ignored. */
  insertResult(r: ResultRow): void {
    this.st('INSERT OR IGNORE INTO result (loop_id, revision, input_hash, status, result_json, computed_at) VALUES (?, ?, ?, ?, ?, ?)')
      .run(r.loop_id, r.revision, r.input_hash, r.status, r.result_json, r.computed_at);
  }

  /**
   * Replaces a stored result that could not be read back (written by an older
   * build in another layout). The only change to a stored row: results are a
   * cache of what the revisions imply, not history.
   */
  replaceResult(r: ResultRow): void {
    this.st('INSERT OR REPLACE INTO result (loop_id, revision, input_hash, status, result_json, computed_at) VALUES (?, ?, ?, ?, ?, ?)')
      .run(r.loop_id, r.revision, r.input_hash, r.status, r.result_json, r.computed_at);
  }

  /** Whether the store holds any axis (load refuses a store that is not empty). */
  isEmpty(): boolean {
    return this.st('SELECT 1 FROM axis LIMIT 1').get() === undefined;
  }
}
