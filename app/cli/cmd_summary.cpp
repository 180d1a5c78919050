// budledger-cli summary P.budledger — what a project holds, in a few lines.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/export/summary.h"
#include "core/store/project.h"

namespace budledger::cli {

void addSummaryCommand(CLI::App& root, Action& action) {
  auto* sub =
      root.add_subcommand("summary", "Print what a project holds and what the engine found");
  auto path = std::make_shared<std::string>();
  sub->add_option("project", *path, "Project file (.budledger)")->required();
  sub->callback([&action, path] {
    action = [path] {
      auto project = store::Project::open(*path, store::Database::Access::ReadOnly);
      fmt::print("{}", exporting::projectSummary(project));
      return 0;
    };
  });
}

}  // namespace budledger::cli
