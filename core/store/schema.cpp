#include "core/store/schema.h"

#include <fmt/format.h>

#include <array>
#include <string_view>

namespace budledger::store {
namespace {

// Never edit a migration that has shipped: add a new one.
constexpr std::array<std::string_view, 2> kMigrations{
    // 1: the first project file.
    R"sql(
CREATE TABLE meta (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
CREATE TABLE positions (
  id          INTEGER PRIMARY KEY,
  name        TEXT NOT NULL UNIQUE,
  group_name  TEXT NOT NULL DEFAULT '',
  frame_count INTEGER NOT NULL DEFAULT 0,
  width       INTEGER NOT NULL DEFAULT 0,
  height      INTEGER NOT NULL DEFAULT 0
);
CREATE TABLE inputs (
  id          INTEGER PRIMARY KEY,
  position_id INTEGER NOT NULL REFERENCES positions(id),
  path        TEXT NOT NULL,
  size_bytes  INTEGER NOT NULL,
  sha256      TEXT NOT NULL
);
CREATE TABLE engine_runs (
  id              INTEGER PRIMARY KEY,
  started_utc     TEXT NOT NULL,
  engine_version  TEXT NOT NULL,
  parameters_json TEXT NOT NULL,
  input_digest    TEXT NOT NULL
);
CREATE TABLE traps (
  position_id INTEGER NOT NULL REFERENCES positions(id),
  trap_id     INTEGER NOT NULL,
  row         INTEGER NOT NULL,
  col         INTEGER NOT NULL,
  x           REAL NOT NULL,
  y           REAL NOT NULL,
  edge        INTEGER NOT NULL DEFAULT 0,
  PRIMARY KEY (position_id, trap_id)
);
CREATE TABLE drift (
  position_id INTEGER NOT NULL REFERENCES positions(id),
  frame       INTEGER NOT NULL,
  dx          REAL NOT NULL,
  dy          REAL NOT NULL,
  confidence  REAL NOT NULL,
  focus       REAL NOT NULL,
  PRIMARY KEY (position_id, frame)
);
CREATE TABLE proposals (
  id          INTEGER PRIMARY KEY,
  run_id      INTEGER NOT NULL REFERENCES engine_runs(id),
  position_id INTEGER NOT NULL REFERENCES positions(id),
  trap_id     INTEGER NOT NULL,
  frame       INTEGER NOT NULL,
  kind        TEXT NOT NULL CHECK (kind IN ('bud','separation','death','washout','arrival')),
  confidence  REAL NOT NULL CHECK (confidence >= 0 AND confidence <= 1)
);
CREATE TABLE measurements (
  run_id        INTEGER NOT NULL REFERENCES engine_runs(id),
  position_id   INTEGER NOT NULL REFERENCES positions(id),
  trap_id       INTEGER NOT NULL,
  frame         INTEGER NOT NULL,
  occupancy     TEXT NOT NULL CHECK (occupancy IN ('empty','single','budded','crowded')),
  p_empty       REAL NOT NULL,
  p_single      REAL NOT NULL,
  p_budded      REAL NOT NULL,
  p_crowded     REAL NOT NULL,
  cell_count    INTEGER NOT NULL,
  features_json TEXT NOT NULL DEFAULT '{}',
  PRIMARY KEY (run_id, position_id, trap_id, frame)
);
CREATE INDEX proposals_by_trap ON proposals(run_id, position_id, trap_id, frame);
)sql",
    // 2: the journal of human decisions, the state it materialises, sign-offs.
    R"sql(
CREATE TABLE journal (
  seq          INTEGER PRIMARY KEY,
  utc          TEXT NOT NULL,
  actor        TEXT NOT NULL,
  role         TEXT NOT NULL,
  action       TEXT NOT NULL CHECK (action IN ('accept','move','delete','add','set-outcome',
                 'note','undo','redo','sign-off','revoke','engine-run')),
  target       TEXT NOT NULL,
  value_before TEXT NOT NULL,
  value_after  TEXT NOT NULL,
  reason       TEXT NOT NULL,
  origin       TEXT NOT NULL,
  prev_hash    TEXT NOT NULL,
  hash         TEXT NOT NULL
);
CREATE TRIGGER journal_no_update BEFORE UPDATE ON journal
BEGIN SELECT RAISE(ABORT, 'the journal is append-only: entries cannot be changed'); END;
CREATE TRIGGER journal_no_delete BEFORE DELETE ON journal
BEGIN SELECT RAISE(ABORT, 'the journal is append-only: entries cannot be deleted'); END;
CREATE TABLE current_events (
  event_id        INTEGER PRIMARY KEY,
  position_id     INTEGER NOT NULL REFERENCES positions(id),
  trap_id         INTEGER NOT NULL,
  frame           INTEGER NOT NULL,
  kind            TEXT NOT NULL CHECK (kind IN ('bud','separation','death','washout','arrival')),
  confidence      REAL NOT NULL,
  status          TEXT NOT NULL CHECK (status IN ('proposed','accepted','moved','added','rejected')),
  origin_proposal INTEGER REFERENCES proposals(id),
  proposed_frame  INTEGER,
  last_seq        INTEGER NOT NULL
);
CREATE INDEX current_events_by_trap ON current_events(position_id, trap_id);
CREATE TABLE outcome_overrides (
  position_id INTEGER NOT NULL REFERENCES positions(id),
  trap_id     INTEGER NOT NULL,
  mother      INTEGER NOT NULL,
  outcome     TEXT NOT NULL CHECK (outcome IN ('death','washout','end-of-imaging')),
  last_seq    INTEGER NOT NULL,
  PRIMARY KEY (position_id, trap_id, mother)
);
CREATE TABLE signoffs (
  id          INTEGER PRIMARY KEY,
  scope_kind  TEXT NOT NULL CHECK (scope_kind IN ('experiment','position','trap')),
  position_id INTEGER,
  trap_id     INTEGER,
  scope_name  TEXT NOT NULL,
  person      TEXT NOT NULL,
  role        TEXT NOT NULL,
  meaning     TEXT NOT NULL CHECK (meaning IN ('reviewed','approved')),
  digest      TEXT NOT NULL,
  utc         TEXT NOT NULL,
  revoked_seq INTEGER
);
CREATE TABLE carry_over_review (
  run_id      INTEGER NOT NULL REFERENCES engine_runs(id),
  event_id    INTEGER NOT NULL,
  position_id INTEGER NOT NULL,
  trap_id     INTEGER NOT NULL,
  frame       INTEGER NOT NULL,
  kind        TEXT NOT NULL,
  status      TEXT NOT NULL,
  PRIMARY KEY (run_id, event_id)
);
)sql",
};

}  // namespace

int latestSchemaVersion() { return static_cast<int>(kMigrations.size()); }

void migrate(Database& db) {
  auto st = db.prepare("PRAGMA user_version");
  st.step();
  const int current = st.integer(0);
  if (current > latestSchemaVersion())
    throw StoreError(fmt::format(
        "project file has schema version {}, newer than this BudLedger understands ({})", current,
        latestSchemaVersion()));
  if (current == latestSchemaVersion()) return;
  if (current == 0) {
    // A non-empty file without our version is someone else's database.
    auto tables = db.prepare("SELECT count(*) FROM sqlite_master");
    tables.step();
    if (tables.integer(0) != 0)
      throw StoreError("file is an SQLite database but not a BudLedger project");
  }
  Transaction tx(db);
  for (int v = current; v < latestSchemaVersion(); ++v)
    db.exec(kMigrations[static_cast<size_t>(v)]);
  db.exec(fmt::format("PRAGMA user_version = {}", latestSchemaVersion()));
  tx.commit();
}

}  // namespace budledger::store
