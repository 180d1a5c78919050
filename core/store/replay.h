#pragma once
// Replay: current state = replay(proposals, journal). A pure function — no
// database — so that the materialised tables can always be rebuilt from the
// journal and checked against it (verify.h), and so that it can be tested on
// its own. It also checks every entry against the state it finds: the value
// before must be what stands, an undo must reverse the entry on top of the
// undo stack, nothing may change inside an active sign-off, an engine run's
// proposals must match their digest and its carry-over must be the one
// carryOver() computes. The first entry that fails is reported and replay
// stops there.
#include <cstdint>
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "core/base/events.h"
#include "core/store/current_event.h"
#include "core/store/journal.h"
#include "core/store/scope.h"
#include "core/store/signoff.h"

namespace budledger::store {

struct OutcomeOverride {
  Outcome outcome = Outcome::Death;
  std::int64_t lastSeq = 0;
  bool operator==(const OutcomeOverride&) const = default;
};

// A decided event a re-analysis could not carry over, as it stood then.
struct ReviewItem {
  std::int64_t run = 0;  // the engine run that could not take the decision
  std::int64_t eventId = 0;
  EventState state;  // the decided event as it stood
  bool operator==(const ReviewItem&) const = default;
};

struct ReplayState {
  std::map<std::int64_t, CurrentEvent> events;  // by event id
  std::map<TenureKey, OutcomeOverride> outcomes;
  std::map<std::int64_t, SignOffRecord> signoffs;  // by id (seq of the sign-off)
  std::vector<ReviewItem> review;                  // by (run, event id)
  std::vector<std::int64_t> undo;                  // seqs of undoable edits, oldest first
  std::vector<std::int64_t> redo;                  // seqs of undone edits, oldest first
  bool operator==(const ReplayState&) const = default;
};

// What replay needs besides the journal.
struct ReplaySources {
  std::map<std::int64_t, std::vector<Event>> proposals;  // by engine run id
  std::map<int, std::string> positionNames;              // by position id
};

struct ReplayProblem {
  std::int64_t seq = 0;
  std::string what;
};

struct ReplayResult {
  ReplayState state;
  std::optional<ReplayProblem> problem;  // the first inconsistent entry
};

// `entries` in seq order.
ReplayResult replay(const std::vector<JournalEntry>& entries, const ReplaySources& sources);

// Applies one entry to `state`; `lookup` finds earlier entries by seq (undo
// and redo name the entry they reverse). Returns what is wrong, or nothing.
using EntryLookup = std::function<const JournalEntry*(std::int64_t seq)>;
std::optional<std::string> applyEntry(ReplayState& state, const JournalEntry& entry,
                                      const ReplaySources& sources, const EntryLookup& lookup);

// The outcome value form: {"outcome":"death","override":true}; with
// "override":false the outcome is the one the events give (no override).
std::string outcomeJson(std::optional<Outcome> override, Outcome effective);

// Active sign-off whose scope covers `trap`, if any (the lowest id).
const SignOffRecord* activeSignOffCovering(const ReplayState& state, const TrapRef& trap);

}  // namespace budledger::store
