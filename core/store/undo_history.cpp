#include "core/store/undo_history.h"

#include "core/store/journal.h"

namespace budledger::store {

UndoHistory::UndoHistory(Database& db)
    : walk_(db.prepare("SELECT seq, action, target, origin FROM journal ORDER BY seq DESC")) {}

UndoTops UndoHistory::tops() {
  UndoTops t;
  bool undoDone = false;
  bool redoDone = false;
  int hiddenPushes = 0;  // undo entries seen whose pushes are still to come
  int takenUndos = 0;    // redo entries seen whose undos are still to come
  while (!(undoDone && redoDone) && walk_.step()) {
    const auto action = journalActionFromString(walk_.text(1));
    if (!action) continue;
    if (*action == JournalAction::EngineRun || !walk_.text(3).empty()) break;
    const auto named = [&]() -> std::optional<std::int64_t> {
      const auto target = parseTarget(walk_.text(2));
      if (target && target->kind == Target::Kind::Entry) return target->id;
      return std::nullopt;
    };
    if (isUndoableEdit(*action)) {
      if (!undoDone) {
        if (hiddenPushes > 0) {
          --hiddenPushes;
        } else {
          t.undo = walk_.int64(0);
          undoDone = true;
        }
      }
      redoDone = true;  // this edit emptied the redo stack
    } else if (*action == JournalAction::Redo) {
      if (!undoDone) {
        if (hiddenPushes > 0) {
          --hiddenPushes;
        } else {
          t.undo = named();
          undoDone = true;
        }
      }
      if (!redoDone) ++takenUndos;
    } else if (*action == JournalAction::Undo) {
      if (!undoDone) ++hiddenPushes;
      if (!redoDone) {
        if (takenUndos > 0) {
          --takenUndos;
        } else {
          t.redo = named();
          redoDone = true;
        }
      }
    }
  }
  walk_.reset();
  return t;
}

}  // namespace budledger::store
