#pragma once
// Verify: does a project file still hold what BudLedger wrote? Checks, in
// order, SQLite's own integrity check; the journal's hash chain (seq without
// gaps, each entry's hash over its canonical text, each link to the entry
// before); a replay from scratch (every entry consistent with the state it
// finds, engine runs matching their proposals' digests); the materialised
// tables against that replay; every active sign-off's lifespans digest; the
// recorded journal head (catches entries cut from the end); and the guard
// triggers that keep the journal append-only. The first problem names the
// first broken entry or row.
//
// What it cannot catch: someone who rewrites the whole file consistently,
// recomputing every hash. Against that, keep the head hash it prints
// (`budledger-cli verify`) outside the file — in a lab notebook, an e-mail —
// and compare later (docs/audit-trail.md).
#include <cstdint>
#include <string>
#include <vector>

#include "core/store/project.h"

namespace budledger::store {

struct VerifyReport {
  std::int64_t entries = 0;
  std::string head;  // "<seq>:<hash>" of the last entry
  std::size_t events = 0;
  int runs = 0;
  int signOffsChecked = 0;
  std::vector<std::string> problems;  // most telling first
  bool ok() const { return problems.empty(); }
};

// Works on a read-only project; writes nothing.
VerifyReport verifyProject(Project& project);

}  // namespace budledger::store
