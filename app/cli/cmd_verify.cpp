// budledger-cli verify P.budledger — exit 0 only if the journal's hash chain
// holds, a replay from scratch gives the stored state and every active
// sign-off's digest still matches; otherwise name the first broken entry.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/store/verify.h"

namespace budledger::cli {

void addVerifyCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "verify", "Check the journal's hash chain, replay it and check every sign-off");
  auto path = std::make_shared<std::string>();
  sub->add_option("project", *path, "Project file (.budledger)")->required();
  sub->callback([&action, path] {
    action = [path] {
      auto project = store::Project::open(*path, store::Database::Access::ReadOnly);
      const auto r = store::verifyProject(project);
      if (!r.ok()) {
        fmt::print("FAILED: {}\n", r.problems.front());
        for (std::size_t i = 1; i < r.problems.size(); ++i)
          fmt::print("  also: {}\n", r.problems[i]);
        return 1;
      }
      fmt::print(
          "ok: {} journal entries chain intact, replay of {} engine run{} matches {} current "
          "events, {} active sign-off{} {}\nhead {}\n",
          r.entries, r.runs, r.runs == 1 ? "" : "s", r.events, r.signOffsChecked,
          r.signOffsChecked == 1 ? "" : "s", r.signOffsChecked == 1 ? "holds" : "hold",
          r.head.empty() ? "(empty journal)" : r.head);
      return 0;
    };
  });
}

}  // namespace budledger::cli
