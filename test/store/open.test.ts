import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { initMachine, openMachine } from '../../src/engine/index.js';
import { UserError } from '../../src/model/errors.js';
import { applyMigrations, listMigrations, migrationsDir } from '../../src/store/migrations.js';
import { APPLICATION_ID, openStore } from '../../src/store/open.js';
import { tempDir, thrown, track } from '../engine/helpers.js';

const sha = (file: string) => createHash('sha256').update(fs.readFileSync(file)).digest('hex');
const latest = () => listMigrations().at(-1)!.version;

/** Opening must refuse with one line naming the file, and leave the file and its folder exactly as they were. */
function expectRefusedUntouched(file: string, pattern: RegExp, open: () => unknown): void {
  const before = sha(file);
  const listing = fs.readdirSync(path.dirname(file)).sort();
  const e = thrown(open);
  expect(e).toBeInstanceOf(UserError);
  expect(e.message).toMatch(pattern);
  expect(e.message).toContain(file);
  expect(e.message).toContain('nothing was changed');
  expect(e.message).not.toContain('\n');
  expect(sha(file)).toBe(before);
  expect(fs.readdirSync(path.dirname(file)).sort()).toEqual(listing);
}

describe('migrations', () => {
  it('creates every table from an empty file and records each migration once, also when reopened', () => {
    const file = path.join(tempDir(), 'm.db');
    initMachine(file, { name: 'rig', unit: 'hz' }).close();
    const check = () => {
      const db = new Database(file, { readonly: true });
      try {
        expect(db.pragma('application_id', { simple: true })).toBe(APPLICATION_ID);
        expect(db.pragma('user_version', { simple: true })).toBe(latest());
        expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
        const tables = db.prepare("SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY name").pluck().all();
        expect(tables).toEqual(['axis', 'loop', 'machine', 'result', 'revision', 'schema_migrations']);
        return db.prepare('SELECT version, name, applied_at FROM schema_migrations ORDER BY version').all();
      } finally {
        db.close();
      }
    };
    const first = check();
    expect(first.map((r) => (r as { version: number }).version)).toEqual(listMigrations().map((m) => m.version));
    const m = track(openMachine(file));
    expect(m.settings()).toMatchObject({ name: 'rig', unit: 'hz', schemaVersion: latest() });
    m.close();
    expect(check()).toEqual(first);
  });

  it('orders migration files by number, not by text (1, 9, 10)', () => {
    const dir = tempDir();
    for (const f of ['10_c.sql', '1_a.sql', '9_b.sql', 'notes.txt']) fs.writeFileSync(path.join(dir, f), '');
    expect(listMigrations(dir).map((m) => `${m.version}:${m.name}`)).toEqual(['1:a', '9:b', '10:c']);
  });

  it('rolls back a failing migration alone and applies it once fixed', () => {
    const dir = tempDir();
    fs.copyFileSync(path.join(migrationsDir(), '001_initial.sql'), path.join(dir, '001_initial.sql'));
    fs.writeFileSync(path.join(dir, '002_extra.sql'), 'CREATE TABLE extra (x INTEGER);\nTHIS IS NOT SQL;\n');
    const db = new Database(path.join(dir, 's.db'));
    try {
      const e = thrown(() => applyMigrations(db, listMigrations(dir)));
      expect(e.message).toMatch(/002_extra\.sql failed and was rolled back/);
      expect(db.pragma('user_version', { simple: true })).toBe(1);
      expect(db.prepare("SELECT count(*) FROM sqlite_schema WHERE name = 'extra'").pluck().get()).toBe(0);
      expect(db.prepare('SELECT version FROM schema_migrations').pluck().all()).toEqual([1]);
      fs.writeFileSync(path.join(dir, '002_extra.sql'), 'CREATE TABLE extra (x INTEGER);\n');
      expect(applyMigrations(db, listMigrations(dir))).toBe(2);
      expect(db.prepare('SELECT version FROM schema_migrations ORDER BY version').pluck().all()).toEqual([1, 2]);
    } finally {
      db.close();
    }
  });
});

describe('refusals that change nothing', () => {
  it('refuses a store written by a newer schema', () => {
    const file = path.join(tempDir(), 'new.db');
    initMachine(file, { name: 'rig', unit: 'rad' }).close();
    const db = new Database(file);
    db.pragma(`user_version = ${latest() + 3}`);
    db.close();
    expectRefusedUntouched(file, /newer loopledger \(store schema \d+, this version knows up to \d+\)/, () => openMachine(file));
  });

  it('refuses a text file, a binary file and an empty file', () => {
    const dir = tempDir();
    const text = path.join(dir, 'notes.txt');
    fs.writeFileSync(text, 'position loop tuning notes\n');
    expectRefusedUntouched(text, /not a loopledger store \(not an SQLite database\)/, () => openMachine(text));
    expectRefusedUntouched(text, /not a loopledger store/, () => initMachine(text, { name: 'x', unit: 'hz' }));
    const bin = path.join(dir, 'blob.bin');
    fs.writeFileSync(bin, Buffer.from(Array.from({ length: 5000 }, (_, i) => (i * 37 + 11) % 256)));
    expectRefusedUntouched(bin, /not an SQLite database/, () => openMachine(bin));
    const empty = path.join(dir, 'empty.db');
    fs.writeFileSync(empty, '');
    const e = thrown(() => openMachine(empty));
    expect(e.message).toMatch(/empty file, not a loopledger store/);
    expect(fs.statSync(empty).size).toBe(0);
  });

  it('refuses another program\'s SQLite database, in rollback and in WAL mode', () => {
    for (const mode of ['delete', 'wal']) {
      const file = path.join(tempDir(), `other-${mode}.db`);
      const db = new Database(file);
      db.pragma(`journal_mode = ${mode}`);
      db.exec("CREATE TABLE parts (id INTEGER PRIMARY KEY, name TEXT); INSERT INTO parts (name) VALUES ('belt')");
      db.close();
      expectRefusedUntouched(file, /SQLite database of another program/, () => openMachine(file));
      expectRefusedUntouched(file, /SQLite database of another program/, () => initMachine(file, { name: 'x', unit: 'hz' }));
    }
  });

  it('refuses a corrupt file that starts like SQLite', () => {
    const file = path.join(tempDir(), 'broken.db');
    const junk = Buffer.alloc(8192, 0x5a);
    Buffer.from('SQLite format 3\0', 'latin1').copy(junk, 0);
    fs.writeFileSync(file, junk);
    expectRefusedUntouched(file, /corrupt or not a database/, () => openMachine(file));
  });

  it('does not create a store where none was asked for', () => {
    const file = path.join(tempDir(), 'missing.db');
    expect(thrown(() => openStore(file)).message).toMatch(/no store at .*loopledger init/);
    expect(fs.existsSync(file)).toBe(false);
  });

  it('turns an empty file into a store on init, and refuses a second init', () => {
    const file = path.join(tempDir(), 'zero.db');
    fs.writeFileSync(file, '');
    initMachine(file, { name: 'rig', unit: 'hz' }).close();
    expectRefusedUntouched(file, /already a loopledger store \(machine 'rig'\)/, () => initMachine(file, { name: 'other', unit: 'rad' }));
  });
});
