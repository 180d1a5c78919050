// budledger-cli: headless entry point. Parses the command line and runs one verb.
#include <fmt/format.h>
#include <CLI/CLI.hpp>

#include <exception>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "budledger/version.h"
#include "core/base/error.h"

int main(int argc, char** argv) {
  using namespace budledger::cli;
  CLI::App app{
      "BudLedger command-line tool: simulate, analyse, edit, verify and export "
      "replicative-lifespan experiments (research software, not for clinical or "
      "diagnostic use)",
      "budledger-cli"};
  app.set_version_flag("--version", fmt::format("budledger-cli {}", budledger::kVersion));
  app.require_subcommand(1);

  Action action;
  addSummaryCommand(app, action);
  addSimulateCommand(app, action);
  addStatsCommand(app, action);
  addAnalyzeCommand(app, action);
  addEditCommand(app, action);
  addLogCommand(app, action);
  addVerifyCommand(app, action);
  addSignoffCommand(app, action);
  addUndoCommand(app, action);
  addRedoCommand(app, action);
  addMergeCommand(app, action);
  addExportCommand(app, action);
  addEvaluateCommand(app, action);
  addTrainCommand(app, action);

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ParseError& e) {
    printError(fmt::format("{} (see budledger-cli --help)", e.what()));
    return 2;
  }

  try {
    return action ? action() : 2;
  } catch (const budledger::Cancelled&) {
    printError("cancelled");
    return 1;
  } catch (const std::exception& e) {
    printError(e.what());
    return 1;
  }
}
