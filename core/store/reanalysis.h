#pragma once
// Re-analysis: journaling an engine run whose proposals have just been
// inserted, and carrying earlier decisions over to them (carry_over.h). Runs
// inside the caller's transaction — Project::addEngineRun's — so a run and
// its journal entry land together or not at all. The materialised state of
// the covered positions is updated with the very function replay uses, so
// the live state cannot drift from a replay.
#include <cstdint>
#include <string>
#include <vector>

#include "core/store/journal.h"
#include "core/store/sqlite.h"

namespace budledger::store {

// `positions`: the positions the run covers (ascending). Throws StoreError
// when a sign-off covers one of them.
void journalEngineRun(Database& db, std::int64_t run, const std::vector<int>& positions,
                      const Actor& by, const std::string& reason);

}  // namespace budledger::store
