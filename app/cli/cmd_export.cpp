// budledger-cli export P.budledger --events F --lifespans F — CSV tables of
// the current state. Each output is one row of kOutputs: a new table (e.g.
// --traps) is one more row and one writer function. Every file is written to
// a temporary name and renamed, so a failed export leaves no half file.
#include <fmt/format.h>

#include <unistd.h>
#include <filesystem>
#include <fstream>
#include <functional>
#include <map>
#include <memory>
#include <string>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/export/csv_exports.h"
#include "core/export/traps_csv.h"
#include "core/store/project.h"

namespace budledger::cli {
namespace {

struct ExportOutput {
  const char* flag;
  const char* help;
  std::function<void(store::Project&, std::ostream&)> write;
};

const std::vector<ExportOutput>& outputs() {
  static const std::vector<ExportOutput> kOutputs{
      {"--events", "events.csv: every current event with its status", exporting::writeEventsCsv},
      {"--lifespans", "lifespans.csv: one row per mother's tenure", exporting::writeLifespansCsv},
      {"--traps", "traps.csv: the trap layout (position,trap_id,row,col,x,y,edge)",
       exporting::writeTrapsCsv},
  };
  return kOutputs;
}

struct ExportArgs {
  std::string project;
  std::map<std::string, std::string> paths;  // flag → file
};

void writeAtomically(const std::string& path, const ExportOutput& o, store::Project& p) {
  const auto tmp = fmt::format("{}.tmp-{}", path, getpid());
  {
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    if (!out) throw std::runtime_error(fmt::format("{}: cannot be written", path));
    o.write(p, out);
    out.flush();
    if (!out) {
      std::filesystem::remove(tmp);
      throw std::runtime_error(fmt::format("{}: writing failed", path));
    }
  }
  std::filesystem::rename(tmp, path);
}

}  // namespace

void addExportCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand("export", "Write CSV tables of the current events, lifespans and traps");
  auto a = std::make_shared<ExportArgs>();
  sub->add_option("project", a->project, "Project file (.budledger)")->required();
  for (const auto& o : outputs()) sub->add_option(o.flag, a->paths[o.flag], o.help);
  sub->callback([&action, a] {
    bool any = false;
    for (const auto& [flag, path] : a->paths) any |= !path.empty();
    if (!any)
      throw CLI::ValidationError("export", "name at least one output (--events, --lifespans, --traps)");
    action = [a] {
      auto project = store::Project::open(a->project, store::Database::Access::ReadOnly);
      for (const auto& o : outputs()) {
        const auto& path = a->paths[o.flag];
        if (path.empty()) continue;
        writeAtomically(path, o, project);
        fmt::print("wrote {}\n", path);
      }
      return 0;
    };
  });
}

}  // namespace budledger::cli
