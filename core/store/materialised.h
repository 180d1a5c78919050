#pragma once
// The materialised state: the tables that hold replay()'s result so that
// views and edits need not replay the journal each time — current_events,
// outcome_overrides, signoffs and carry_over_review. They are a
// cache of the journal, never a source: rebuildState() rewrites them from a
// replay, and verify compares them with one. Also the read queries the UI and
// the CLI use.
#include <map>
#include <optional>
#include <vector>

#include "core/store/current_event.h"
#include "core/store/replay.h"
#include "core/store/scope.h"
#include "core/store/sqlite.h"

namespace budledger::store {

// Everything replay needs from the file: every run's proposals, position names.
ReplaySources loadReplaySources(Database& db);

// Reads the materialised tables back as a state (for comparison with
// replay); its undo and redo stacks stay empty — they are not stored
// (undo_history.h).
ReplayState readState(Database& db);
// Equal in everything the tables hold (all but the undo and redo stacks).
bool sameMaterialised(const ReplayState& a, const ReplayState& b);
// Rewrites every materialised table from `state`, inside the caller's transaction.
void writeState(Database& db, const ReplayState& state);
// Row writers shared by writeState, re-analysis and the Editor.
inline constexpr const char* kInsertEventSql =
    "INSERT INTO current_events(event_id, position_id, trap_id, frame, kind, confidence, status, "
    "origin_proposal, proposed_frame, last_seq) VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10)";
void bindEventRow(Statement& insert, const CurrentEvent& e);  // binds ?1…?10 of kInsertEventSql
void insertEvents(Database& db, const std::map<std::int64_t, CurrentEvent>& events);
void insertReview(Database& db, const std::vector<ReviewItem>& items);
// Replays the journal from scratch and rewrites the tables in one transaction.
// Throws StoreError naming the first inconsistent entry (and writes nothing).
void rebuildState(Database& db);

// Current events (Event plus status and origin), ordered by position, trap, frame, id.
std::vector<CurrentEvent> currentEvents(Database& db);
std::vector<CurrentEvent> currentEvents(Database& db, int position);
std::vector<CurrentEvent> currentEvents(Database& db, const TrapRef& trap);
std::optional<CurrentEvent> currentEvent(Database& db, std::int64_t id);

std::map<TenureKey, OutcomeOverride> outcomeOverrides(Database& db);
std::vector<SignOffRecord> signOffs(Database& db);  // by id, revoked ones included
// Decisions a re-analysis could not carry over, oldest run first.
std::vector<ReviewItem> reviewItems(Database& db);

}  // namespace budledger::store
