#pragma once
// Editor: the one way people change a project — the workstation and the CLI
// both call these functions and never build journal entries or undo records
// themselves (style.md, "Edits, undo and the journal").
//
// Every call takes the Actor (who, in which role) and a reason. Each call
// that changes something is exactly one BEGIN IMMEDIATE transaction holding
// one journal entry and the matching update of the materialised state, and
// is committed before the call returns; a call that would change nothing
// writes nothing and returns a Change with recorded() false. A call that is
// not allowed (unknown event, frame outside the movie, inside an active
// sign-off, read-only project) throws EditRefused and writes nothing.
//
// Undo and redo are new entries that reverse or repeat a named edit (accept,
// move, delete, add, set-outcome) — linear history as in any editor; a new
// edit clears the redo stack, and a re-analysis starts a fresh history.
// Notes, sign-offs and revocations are not undone: a sign-off is withdrawn by
// revoke(), which needs a reason. Consecutive drags are not merged into one
// entry: the journal never rewrites, so a view commits a move on release.
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "core/base/events.h"
#include "core/store/journal.h"
#include "core/store/project.h"
#include "core/store/scope.h"
#include "core/store/signoff.h"

namespace budledger::store {

class EditRefused : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// What one call did, for views that recompute only what changed.
struct Change {
  std::int64_t seq = 0;  // the journal entry written; 0 when nothing changed
  JournalAction action = JournalAction::Note;
  std::vector<TrapRef> traps;  // traps whose events, outcomes or sign-off state changed
  std::string summary;         // one line for a status bar
  bool recorded() const { return seq != 0; }
};

class Editor {
 public:
  // `project` must outlive the Editor.
  explicit Editor(Project& project);
  ~Editor();
  Editor(const Editor&) = delete;
  Editor& operator=(const Editor&) = delete;

  // Called after each recorded change has been committed.
  using Listener = std::function<void(const Change&)>;
  void setListener(Listener listener);

  // Confirms an event as the engine proposed it (restoring the proposed frame
  // of a moved or rejected proposal); restores a deleted added event.
  Change accept(const Actor& by, std::int64_t eventId, std::string_view reason = {});
  // Deletes an event: it stays in the journal and the state as rejected.
  Change reject(const Actor& by, std::int64_t eventId, std::string_view reason = {});
  Change move(const Actor& by, std::int64_t eventId, int frame, std::string_view reason = {});
  // The new event's id is minus the seq of its entry (Change::seq).
  Change add(const Actor& by, const TrapRef& trap, int frame, EventKind kind,
             std::string_view reason = {});
  // Overrides how a tenure ended (e.g. a dead mother later washed out is a
  // death, not a censoring); `tenure.mother` counts from 0 within the trap.
  Change setOutcome(const Actor& by, const TenureKey& tenure, Outcome outcome,
                    std::string_view reason = {});
  // A note on an event, tenure, trap, position or the experiment.
  Change note(const Actor& by, const Target& target, std::string_view text,
              std::string_view reason = {});
  Change undo(const Actor& by, std::string_view reason = {});
  Change redo(const Actor& by, std::string_view reason = {});
  // Binds the digest of the lifespans in `scope` (lifespans.h). Signing the
  // same scope, meaning and digest twice as the same person records nothing.
  Change signOff(const Actor& by, const Scope& scope, SignMeaning meaning,
                 std::string_view reason = {});
  Change revoke(const Actor& by, std::int64_t signOffId, std::string_view reason);

  // The entry undo() would reverse / redo() would repeat.
  std::optional<JournalEntry> nextUndo();
  std::optional<JournalEntry> nextRedo();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace budledger::store
