#pragma once
// Where undo and redo stand, read from the journal itself. The undo and
// redo stacks are a function of the journal (replay.h computes them whole);
// an edit needs only their tops, which a walk back from the end finds after
// a few entries. Keeping no stack table spares every edit two page writes.
//
// Walking back: an undo entry hides one earlier push from the undo stack and
// is itself the top of the redo stack unless a later redo took it; an edit
// or a redo is the top of the undo stack unless a later undo took it; an
// edit empties the redo stack before it. An engine run, or an entry imported
// by merge, starts a fresh history.
#include <cstdint>
#include <optional>

#include "core/store/sqlite.h"

namespace budledger::store {

struct UndoTops {
  std::optional<std::int64_t> undo;  // seq of the edit undo() would reverse
  std::optional<std::int64_t> redo;  // seq of the edit redo() would repeat
};

class UndoHistory {
 public:
  explicit UndoHistory(Database& db);
  UndoTops tops();

 private:
  Statement walk_;
};

}  // namespace budledger::store
