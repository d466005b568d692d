-- loopledger store, schema 1.
-- Applied inside one transaction together with its row in schema_migrations.
-- History is append-only: revisions and results are inserted, never updated.

-- Marks the file as a loopledger store ('LLDG'), so other SQLite files are recognised and left alone.
PRAGMA application_id = 1280066631;

CREATE TABLE schema_migrations (
  version     INTEGER PRIMARY KEY,
  name        TEXT NOT NULL,
  applied_at  TEXT NOT NULL
);

-- One row: the machine this store describes.
CREATE TABLE machine (
  id          INTEGER PRIMARY KEY CHECK (id = 1),
  name        TEXT NOT NULL,
  unit        TEXT NOT NULL CHECK (unit IN ('hz', 'rad')),
  created_at  TEXT NOT NULL
);

CREATE TABLE axis (
  id          INTEGER PRIMARY KEY,
  name        TEXT NOT NULL UNIQUE,
  note        TEXT NOT NULL DEFAULT '',
  author      TEXT NOT NULL,
  created_at  TEXT NOT NULL
);

-- A loop's identity and place in its cascade; its content lives in revisions.
CREATE TABLE loop (
  id             INTEGER PRIMARY KEY,
  axis_id        INTEGER NOT NULL REFERENCES axis(id),
  name           TEXT NOT NULL,
  inner_loop_id  INTEGER REFERENCES loop(id),
  sample_rate_hz REAL CHECK (sample_rate_hz IS NULL OR sample_rate_hz > 0),
  UNIQUE (axis_id, name)
);
CREATE INDEX loop_inner ON loop(inner_loop_id);

-- Every change to a loop: who, when, why, and the full state after it (canonical JSON).
-- state_hash covers the whole state; dynamics_hash only what outer loops see (plants, compensator).
CREATE TABLE revision (
  loop_id        INTEGER NOT NULL REFERENCES loop(id),
  number         INTEGER NOT NULL CHECK (number >= 1),
  parent         INTEGER CHECK (parent IS NULL OR (parent >= 1 AND parent < number)),
  kind           TEXT NOT NULL CHECK (kind IN ('create', 'plant', 'spec', 'comp', 'revert')),
  author         TEXT NOT NULL,
  created_at     TEXT NOT NULL,
  note           TEXT NOT NULL DEFAULT '',
  summary        TEXT NOT NULL DEFAULT '',
  state_json     TEXT NOT NULL,
  state_hash     TEXT NOT NULL,
  dynamics_hash  TEXT NOT NULL,
  PRIMARY KEY (loop_id, number)
) WITHOUT ROWID;

-- Analysis results of a loop at a revision, keyed by the hash of every input
-- (the loop state, the inner loops' dynamics, the analysis version).
CREATE TABLE result (
  loop_id      INTEGER NOT NULL,
  revision     INTEGER NOT NULL,
  input_hash   TEXT NOT NULL,
  status       TEXT NOT NULL CHECK (status IN ('pass', 'fail', 'unstable', 'error')),
  result_json  TEXT NOT NULL,
  computed_at  TEXT NOT NULL,
  PRIMARY KEY (loop_id, revision, input_hash),
  FOREIGN KEY (loop_id, revision) REFERENCES revision(loop_id, number)
) WITHOUT ROWID;
