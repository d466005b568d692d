import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type Database from 'better-sqlite3';

/** One numbered plain-SQL migration file. */
export interface Migration {
  readonly version: number;
  readonly name: string;
  readonly file: string;
}

const FILE_RE = /^(\d+)_([A-Za-z0-9_-]+)\.sql$/;

let cachedDir: string | null = null;

/**
 * The `migrations/` directory of this installation. Searched upwards from this
 * module, because the same code runs from src/store (tests, tsx) and from the
 * bundled dist/ chunk, which sit at different depths below the package root.
 */
export function migrationsDir(): string {
  if (cachedDir !== null) return cachedDir;
  let dir = path.dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 6; i++) {
    const candidate = path.join(dir, 'migrations');
    if (fs.existsSync(path.join(candidate, '001_initial.sql'))) return (cachedDir = candidate);
    const up = path.dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  throw new Error('loopledger installation is incomplete: migrations/001_initial.sql not found above ' + fileURLToPath(import.meta.url));
}

/** Migration files sorted by their number (numerically: 9 before 10). */
export function listMigrations(dir = migrationsDir()): Migration[] {
  const out: Migration[] = [];
  for (const f of fs.readdirSync(dir)) {
    const m = FILE_RE.exec(f);
    if (!m) continue;
    out.push({ version: Number(m[1]), name: m[2]!, file: path.join(dir, f) });
  }
  out.sort((a, b) => a.version - b.version);
  for (let i = 1; i < out.length; i++) {
    if (out[i]!.version === out[i - 1]!.version) throw new Error(`two migrations share number ${out[i]!.version} in ${dir}`);
  }
  return out;
}

/** Versions recorded as applied (empty for a new file). */
function appliedVersions(db: Database.Database): Set<number> {
  const has = db.prepare("SELECT 1 FROM sqlite_schema WHERE type = 'table' AND name = 'schema_migrations'").get();
  if (!has) return new Set();
  const rows = db.prepare('SELECT version FROM schema_migrations').pluck().all() as number[];
  return new Set(rows);
}

/**
 * Applies every migration not yet recorded, in order. Each one runs with its
 * record and the schema version (PRAGMA user_version) in one IMMEDIATE
 * transaction, so a failure rolls back that migration alone and a second
 * process opening the store at the same time never applies one twice.
 * Returns the schema version afterwards.
 */
export function applyMigrations(db: Database.Database, migrations: readonly Migration[], now: () => Date = () => new Date()): number {
  // The common case, nothing pending, is decided without taking the write lock.
  const applied = appliedVersions(db);
  const pending = migrations.filter((m) => !applied.has(m.version));
  if (pending.length === 0) return db.pragma('user_version', { simple: true }) as number;
  // A migration may rebuild a table (SQLite cannot alter a CHECK constraint): with foreign keys on, dropping
  // the old table would cascade into its children. So they are off while migrating (the pragma cannot change
  // inside a transaction), and each migration proves its own result with foreign_key_check before it commits.
  const fk = db.pragma('foreign_keys', { simple: true }) as number;
  db.pragma('foreign_keys = OFF');
  try {
    for (const m of pending) applyOne(db, m, now);
  } finally {
    db.pragma(`foreign_keys = ${fk ? 'ON' : 'OFF'}`);
  }
  return db.pragma('user_version', { simple: true }) as number;
}

function applyOne(db: Database.Database, m: Migration, now: () => Date): void {
  db.transaction(() => {
    if (appliedVersions(db).has(m.version)) return;
    const sql = fs.readFileSync(m.file, 'utf8');
    const fail = (why: string): never => {
      throw new Error(`migration ${path.basename(m.file)} failed and was rolled back: ${why}`);
    };
    try {
      db.exec(sql);
    } catch (e) {
      fail(e instanceof Error ? e.message : String(e));
    }
    const broken = db.pragma('foreign_key_check') as { table: string; parent: string }[];
    if (broken.length > 0) fail(`${broken.length} row(s) of ${broken[0]!.table} lost their ${broken[0]!.parent} row`);
    db.prepare('INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)').run(m.version, m.name, now().toISOString());
    db.pragma(`user_version = ${m.version}`);
  }).immediate();
}
