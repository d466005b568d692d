import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { openMachine } from '../../src/engine/index.js';
import { encodeState, initialState } from '../../src/engine/state.js';
import { applyMigrations, listMigrations, migrationsDir } from '../../src/store/migrations.js';
import { openStore } from '../../src/store/open.js';
import { tempDir, thrown, track } from '../engine/helpers.js';

/** A store as schema 1 left it: revisions with results, one revision without any. */
function schemaOneStore(): string {
  const dir = tempDir();
  const only1 = path.join(dir, 'migrations');
  fs.mkdirSync(only1);
  fs.copyFileSync(path.join(migrationsDir(), '001_initial.sql'), path.join(only1, '001_initial.sql'));
  const file = path.join(dir, 'old.loopledger.db');
  const db = new Database(file);
  try {
    db.pragma('journal_mode = WAL');
    db.pragma('foreign_keys = ON');
    expect(applyMigrations(db, listMigrations(only1))).toBe(1);
    db.prepare("INSERT INTO machine (id, name, unit, created_at) VALUES (1, 'old rig', 'rad', '2024-01-01T00:00:00.000Z')").run();
    db.prepare("INSERT INTO axis (id, name, author, created_at) VALUES (1, 'X', 'ann', '2024-01-01T00:00:00.000Z')").run();
    db.prepare("INSERT INTO loop (id, axis_id, name) VALUES (1, 1, 'vel')").run();
    const enc = encodeState(initialState('nominal', { text: '1/(s*(s+1))', tf: { num: [1], den: [0, 1, 1], delayS: 0 } }));
    const rev = db.prepare('INSERT INTO revision (loop_id, number, parent, kind, author, created_at, note, summary, state_json, state_hash, dynamics_hash) VALUES (1, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)');
    rev.run(1, null, 'create', 'ann', '2024-01-01T00:01:00.000Z', 'first', 'create', enc.json, enc.stateHash, enc.dynamicsHash);
    rev.run(2, 1, 'comp', 'bob', '2024-01-02T00:00:00.000Z', '', 'comp gain:4', enc.json, enc.stateHash, enc.dynamicsHash);
    rev.run(3, 2, 'spec', 'ann', '2024-01-03T00:00:00.000Z', '', 'spec pm>=45', enc.json, enc.stateHash, enc.dynamicsHash);
    const res = db.prepare("INSERT INTO result (loop_id, revision, input_hash, status, result_json, computed_at) VALUES (1, ?, ?, ?, '{}', ?)");
    // Revision 1: saved passing; a later recheck (another inner loop, say) found it failing. The save's is the earlier.
    res.run(1, 'h-later', 'fail', '2024-02-01T00:00:00.000Z');
    res.run(1, 'h-saved', 'pass', '2024-01-01T00:01:00.000Z');
    res.run(2, 'h-two', 'unstable', '2024-01-02T00:00:00.000Z');
  } finally {
    db.close();
  }
  return file;
}

describe('migration 002 (revision kind edit, status then)', () => {
  it('keeps every revision and result, finds each revision the result of its save, and allows kind edit only', async () => {
    const file = schemaOneStore();
    const m = track(openMachine(file, { author: 'cy' }));
    expect(m.settings().schemaVersion).toBe(2);
    expect(m.log('X/vel').map((r) => [r.number, r.kind, r.author, r.status])).toEqual([
      [1, 'create', 'ann', 'pass'], [2, 'comp', 'bob', 'unstable'], [3, 'spec', 'ann', null],
    ]);
    // The old placeholder results are unreadable: check analyses the head again instead of failing.
    const report = await m.check();
    expect(report.reanalysed).toBe(1);
    // Gain 0.5 on 1/(s (s + 1)): PM = 90 deg - atan(0.455) = 65.5 deg (closed form, see test/engine/edit.test.ts).
    const edit = await m.applyEdit('X/vel', { compensator: ['gain:0.5'], requirements: ['pm>=45'] });
    expect(edit.revision).toMatchObject({ number: 4, kind: 'edit', status: 'pass' });
    m.close();

    const { db } = openStore(file);
    try {
      expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
      expect(db.pragma('foreign_key_check')).toEqual([]);
      expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
      expect(db.prepare('SELECT count(*) FROM revision').pluck().get()).toBe(4);
      expect(db.prepare("SELECT count(*) FROM result WHERE input_hash IN ('h-later', 'h-saved', 'h-two')").pluck().get()).toBe(3);
      expect(db.prepare('SELECT version FROM schema_migrations ORDER BY version').pluck().all()).toEqual([1, 2]);
      const bogus = thrown(() => db.prepare("INSERT INTO revision (loop_id, number, parent, kind, author, created_at, state_json, state_hash, dynamics_hash) VALUES (1, 5, 4, 'bogus', 'x', 't', '{}', 'a', 'b')").run());
      expect(bogus.message).toMatch(/CHECK constraint failed/);
      // The result table still refers to revisions: a result of a revision that does not exist is refused.
      const orphan = thrown(() => db.prepare("INSERT INTO result (loop_id, revision, input_hash, status, result_json, computed_at) VALUES (1, 99, 'h', 'pass', '{}', 't')").run());
      expect(orphan.message).toMatch(/FOREIGN KEY constraint failed/);
    } finally {
      db.close();
    }
  });
});
