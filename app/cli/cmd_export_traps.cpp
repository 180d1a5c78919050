// `budledger-cli export P.budledger --traps traps.csv`: the traps of every
// position (position,trap_id,row,col,x,y,edge). Registered on the export
// verb by addTrapsExportOption() so each export format lives in its own file.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "app/cli/commands.h"
#include "core/export/traps_csv.h"

namespace budledger::cli {

void addTrapsExportOption(CLI::App* exportCmd, std::vector<ExportStep>& steps) {
  auto file = std::make_shared<std::string>();
  auto* opt = exportCmd->add_option("--traps", *file,
                                    "Write the trap layout of every position as CSV "
                                    "(position,trap_id,row,col,x,y,edge)");
  steps.push_back([file, opt](store::Project& project) {
    if (opt->count() == 0) return false;
    exporting::exportTrapsCsv(project, *file);
    fmt::print("wrote {}\n", *file);
    return true;
  });
}

}  // namespace budledger::cli
