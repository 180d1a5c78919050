// budledger-cli undo P.budledger / budledger-cli redo P.budledger — reverse
// or repeat the latest edit; both are new journal entries naming the entry
// they act on, never a change to it.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "app/cli/actor_options.h"
#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/store/editor.h"

namespace budledger::cli {
namespace {

struct UndoArgs {
  std::string project;
  ActorOptions actor;
};

void addReversal(CLI::App& root, Action& action, bool isUndo) {
  auto* sub = root.add_subcommand(isUndo ? "undo" : "redo",
                                  isUndo ? "Undo the latest edit (journaled as a new entry)"
                                         : "Redo the latest undone edit (journaled)");
  auto a = std::make_shared<UndoArgs>();
  sub->add_option("project", a->project, "Project file (.budledger)")->required();
  addActorOptions(sub, a->actor, "technician");
  sub->callback([&action, a, isUndo] {
    action = [a, isUndo] {
      auto project = store::Project::open(a->project);
      store::Editor ed(project);
      const auto by = resolveActor(a->actor);
      const auto c = isUndo ? ed.undo(by, a->actor.reason) : ed.redo(by, a->actor.reason);
      if (!c.recorded()) {
        fmt::print("nothing to {}\n", isUndo ? "undo" : "redo");
        return 1;
      }
      fmt::print("entry {}: {}\n", c.seq, c.summary);
      return 0;
    };
  });
}

}  // namespace

void addUndoCommand(CLI::App& root, Action& action) { addReversal(root, action, true); }
void addRedoCommand(CLI::App& root, Action& action) { addReversal(root, action, false); }

}  // namespace budledger::cli
