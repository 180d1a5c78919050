// budledger-cli export P.budledger --FORMAT FILE...: writes the requested
// exports of a project. Each format registers its own option (see
// cmd_export_*.cpp) and an ExportStep that runs when that option was given.
#include <memory>
#include <string>
#include <vector>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/store/project.h"

namespace budledger::cli {

void addExportCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand("export", "Write a project's data as CSV files");
  auto path = std::make_shared<std::string>();
  auto steps = std::make_shared<std::vector<ExportStep>>();
  sub->add_option("project", *path, "Project file (.budledger)")->required();
  addTrapsExportOption(sub, *steps);
  sub->callback([&action, path, steps] {
    action = [path, steps] {
      auto project = store::Project::open(*path, store::Database::Access::ReadOnly);
      int written = 0;
      for (auto& step : *steps) written += step(project) ? 1 : 0;
      if (written == 0) {
        printError("export: name at least one output, e.g. --traps traps.csv");
        return 2;
      }
      return 0;
    };
  });
}

}  // namespace budledger::cli
