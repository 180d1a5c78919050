#pragma once
// The journal: an append-only, hash-chained list of every decision taken on a
// project (design.md, "The journal is append-only and hash-chained").
// Invariants: seq runs 1, 2, 3 … without gaps; entry n's prevHash is entry
// n-1's hash (kGenesisHash for entry 1); hash = SHA-256 of canonicalText(),
// which covers every column but the hash itself. Rows are never updated or
// deleted (SQL triggers refuse it); undo and redo are new entries naming the
// entry they reverse or re-apply. docs/project-file.md documents the form.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/store/sqlite.h"

namespace budledger::store {

enum class JournalAction : std::uint8_t {
  Accept,
  Move,
  Delete,
  Add,
  SetOutcome,
  Note,
  Undo,
  Redo,
  SignOff,
  Revoke,
  EngineRun,  // the engine's proposals arrived (a new analysis); carries decisions over
};
std::string_view toString(JournalAction action);  // "accept", "set-outcome", "engine-run", …
std::optional<JournalAction> journalActionFromString(std::string_view text);
// Edits change events or outcomes and can be undone; notes, sign-offs and runs cannot.
bool isUndoableEdit(JournalAction action);

// Who made an entry: a person's name and the role they act in (technician,
// reviewer, PI …), or a program acting for no one in particular ("system").
struct Actor {
  std::string name;
  std::string role;
};

// What an entry is about, in the journal's `target` column.
struct Target {
  enum class Kind : std::uint8_t { Event, Tenure, Trap, Position, Experiment, Entry, SignOff, Run };
  Kind kind = Kind::Experiment;
  std::int64_t id = 0;  // Event, Entry, SignOff, Run
  int position = 0;     // Tenure, Trap, Position (position id)
  int trap = 0;         // Tenure, Trap
  int mother = 0;       // Tenure

  static Target event(std::int64_t id) { return {Kind::Event, id, 0, 0, 0}; }
  static Target tenure(int p, int t, int m) { return {Kind::Tenure, 0, p, t, m}; }
  static Target trapOf(int p, int t) { return {Kind::Trap, 0, p, t, 0}; }
  static Target positionOf(int p) { return {Kind::Position, 0, p, 0, 0}; }
  static Target experiment() { return {}; }
  static Target entry(std::int64_t seq) { return {Kind::Entry, seq, 0, 0, 0}; }
  static Target signOff(std::int64_t id) { return {Kind::SignOff, id, 0, 0, 0}; }
  static Target run(std::int64_t id) { return {Kind::Run, id, 0, 0, 0}; }
  bool operator==(const Target&) const = default;
};
// "event:12", "event:-40", "tenure:1/4/0", "trap:1/4", "position:1", "experiment",
// "entry:17", "signoff:23", "run:2".
std::string toString(const Target& target);
std::optional<Target> parseTarget(std::string_view text);

struct JournalEntry {
  std::int64_t seq = 0;
  std::string utc;  // ISO 8601, UTC, milliseconds
  std::string actor;
  std::string role;
  JournalAction action = JournalAction::Note;
  std::string target;
  std::string before = "null";  // JSON
  std::string after = "null";   // JSON
  std::string reason;
  std::string origin;  // "" unless imported by merge: "<file>#<seq>:<hash>"
  std::string prevHash;
  std::string hash;
  // Set by readJournal when the stored action is not one this version knows
  // (only a file changed behind BudLedger's back can hold one).
  std::optional<std::string> unknownAction;
};

inline const std::string kGenesisHash(64, '0');

// The text hashed into an entry's hash: a fixed header line, then one line
// per column in a fixed order, each "name=<byte length>:<value>".
std::string canonicalText(const JournalEntry& e);
std::string entryHash(const JournalEntry& e);

// Appends entries inside the caller's open transaction (one edit = one
// BEGIN IMMEDIATE transaction, held by the caller). Statements are prepared
// once: a writer lives as long as the edits it serves.
class JournalWriter {
 public:
  explicit JournalWriter(Database& db);
  // The seq the next append() will get.
  std::int64_t nextSeq();
  // Fills seq, utc (when empty), prevHash and hash, inserts the row and moves
  // meta 'journal_head' to it.
  void append(JournalEntry& e);

 private:
  Database& db_;
  Statement head_;
  Statement insert_;
  Statement meta_;
};

struct JournalHead {
  std::int64_t seq = 0;
  std::string hash = kGenesisHash;
};
JournalHead journalHead(Database& db);

// Entries in seq order, from `fromSeq` on.
std::vector<JournalEntry> readJournal(Database& db, std::int64_t fromSeq = 1);
std::optional<JournalEntry> readEntry(Database& db, std::int64_t seq);

}  // namespace budledger::store
