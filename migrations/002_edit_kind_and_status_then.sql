-- loopledger store, schema 2.
-- 1. A revision kind 'edit': one change of compensator and requirements together (one revision, not two).
-- 2. revision.check_hash: the input hash of the result computed in the change's own transaction, so a
--    revision's status at the time it was saved ("status then") can be read back from `result`.
--    NULL where no result was computed with the save (older revisions of a loaded dump).
-- SQLite cannot alter a CHECK constraint, so the table is rebuilt (the runner turns foreign keys off
-- around a migration and runs PRAGMA foreign_key_check before it commits).

CREATE TABLE revision_v2 (
  loop_id        INTEGER NOT NULL REFERENCES loop(id),
  number         INTEGER NOT NULL CHECK (number >= 1),
  parent         INTEGER CHECK (parent IS NULL OR (parent >= 1 AND parent < number)),
  kind           TEXT NOT NULL CHECK (kind IN ('create', 'plant', 'spec', 'comp', 'revert', 'edit')),
  author         TEXT NOT NULL,
  created_at     TEXT NOT NULL,
  note           TEXT NOT NULL DEFAULT '',
  summary        TEXT NOT NULL DEFAULT '',
  state_json     TEXT NOT NULL,
  state_hash     TEXT NOT NULL,
  dynamics_hash  TEXT NOT NULL,
  check_hash     TEXT,
  PRIMARY KEY (loop_id, number)
) WITHOUT ROWID;

-- Under schema 1 every change stored its result in its own transaction, before any later result of the
-- same revision (a recheck after an inner-loop change, a diff): the earliest one is the result of the save.
-- (Older revisions of a loaded dump had none; where a later diff analysed one, its result stands in.)
INSERT INTO revision_v2 (loop_id, number, parent, kind, author, created_at, note, summary, state_json, state_hash, dynamics_hash, check_hash)
SELECT r.loop_id, r.number, r.parent, r.kind, r.author, r.created_at, r.note, r.summary, r.state_json, r.state_hash, r.dynamics_hash,
       (SELECT x.input_hash FROM result x WHERE x.loop_id = r.loop_id AND x.revision = r.number ORDER BY x.computed_at, x.input_hash LIMIT 1)
FROM revision r;

DROP TABLE revision;
ALTER TABLE revision_v2 RENAME TO revision;
