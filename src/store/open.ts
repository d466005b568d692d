import path from 'node:path';
import fs from 'node:fs';
import Database from 'better-sqlite3';
import { UserError } from '../model/errors.js';
import { applyMigrations, listMigrations } from './migrations.js';

/** 'LLDG': set by migration 001 in the file header, so a loopledger store is recognised without reading tables. */
export const APPLICATION_ID = 0x4c4c4447;

const SQLITE_MAGIC = Buffer.from('SQLite format 3\0', 'latin1');

/** An open store: the connection and the schema version it is at. */
export interface Store {
  readonly db: Database.Database;
  readonly path: string;
  readonly schemaVersion: number;
}

export interface OpenStoreOptions {
  /** Create the file (or fill a zero-byte file) when there is no store yet. */
  readonly create?: boolean;
}

function headerBytes(file: string): Buffer {
  const fd = fs.openSync(file, 'r');
  try {
    const buf = Buffer.alloc(16);
    const n = fs.readSync(fd, buf, 0, 16, 0);
    return buf.subarray(0, n);
  } finally {
    fs.closeSync(fd);
  }
}

/** What a read-only look at an existing file found. */
type Probe = { kind: 'store'; version: number } | { kind: 'foreign' } | { kind: 'corrupt'; reason: string };

/**
 * Looks at an existing SQLite file read-only. Reading a WAL-mode file makes
 * SQLite create -wal/-shm companions even then; `cleanUp` removes the ones this
 * look created, for when the file is refused.
 */
function probe(file: string): { found: Probe; cleanUp: () => void } {
  const companions = [`${file}-wal`, `${file}-shm`].filter((f) => !fs.existsSync(f));
  let ro: Database.Database | null = null;
  let found: Probe;
  try {
    ro = new Database(file, { readonly: true, fileMustExist: true });
    const appId = ro.pragma('application_id', { simple: true }) as number;
    const version = ro.pragma('user_version', { simple: true }) as number;
    ro.prepare('SELECT count(*) FROM sqlite_schema').get();
    found = appId === APPLICATION_ID && version > 0 ? { kind: 'store', version } : { kind: 'foreign' };
  } catch (e) {
    found = { kind: 'corrupt', reason: e instanceof Error ? e.message : String(e) };
  } finally {
    ro?.close();
  }
  const cleanUp = () => {
    for (const f of companions) {
      try {
        if (fs.existsSync(f) && (f.endsWith('-shm') || fs.statSync(f).size === 0)) fs.unlinkSync(f);
      } catch {
        // A leftover empty companion is harmless: SQLite ignores it.
      }
    }
  };
  return { found, cleanUp };
}

/**
 * Opens (or with `create`, creates) a store. Before anything is written the file
 * is checked: not SQLite, corrupt, another program's database, or a newer schema
 * are refused with one clear line and the file is left exactly as it was.
 * Then: WAL mode, a 5 s busy timeout, foreign keys on, pending migrations applied.
 */
export function openStore(file: string, opts: OpenStoreOptions = {}): Store {
  const migrations = listMigrations();
  const latest = migrations[migrations.length - 1]?.version ?? 0;
  let stat: fs.Stats | null = null;
  try {
    stat = fs.statSync(file);
  } catch {
    stat = null;
  }
  const fresh = stat === null || (stat.isFile() && stat.size === 0);
  if (stat !== null && !stat.isFile()) throw new UserError(`${file} is not a file; give the path of a loopledger store with --store`);
  if (fresh && !opts.create) {
    throw new UserError(stat === null
      ? `no store at ${file}; create one with 'loopledger init' or point --store at an existing one`
      : `${file} is an empty file, not a loopledger store; 'loopledger init' makes it one`);
  }
  if (!fresh) {
    const nothing = 'nothing was changed';
    if (!headerBytes(file).equals(SQLITE_MAGIC)) throw new UserError(`${file} is not a loopledger store (not an SQLite database); ${nothing}`);
    const { found: p, cleanUp } = probe(file);
    const refuse = (why: string): never => {
      cleanUp();
      throw new UserError(`${file} ${why}; ${nothing}`);
    };
    if (p.kind === 'corrupt') refuse(`cannot be read as a loopledger store (corrupt or not a database: ${p.reason})`);
    if (p.kind === 'foreign') refuse('is an SQLite database of another program, not a loopledger store');
    if (p.kind === 'store' && p.version > latest) {
      refuse(`was written by a newer loopledger (store schema ${p.version}, this version knows up to ${latest}); upgrade loopledger to open it`);
    }
  }
  const dir = path.dirname(path.resolve(file));
  if (!fs.existsSync(dir)) throw new UserError(`cannot create ${file}: the folder ${dir} does not exist; create it first or choose another --store path`);
  const db = new Database(file, { timeout: 5000 });
  try {
    db.pragma('journal_mode = WAL');
    db.pragma('foreign_keys = ON');
    const schemaVersion = applyMigrations(db, migrations);
    return { db, path: file, schemaVersion };
  } catch (e) {
    db.close();
    throw e;
  }
}
