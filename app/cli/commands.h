#pragma once
// The verbs of budledger-cli. Each add*Command() declares its subcommand's
// options on `root` and, when that subcommand is chosen, stores the work to do
// in `action`; main() runs it after parsing. Exit codes: 0 success, 1 the work
// failed (bad input, a check that did not hold), 2 a usage error.
#include <CLI/CLI.hpp>

#include <functional>
#include <vector>

namespace budledger::store {
class Project;
}

namespace budledger::cli {

using Action = std::function<int()>;

void addSummaryCommand(CLI::App& root, Action& action);
void addSimulateCommand(CLI::App& root, Action& action);
void addStatsCommand(CLI::App& root, Action& action);
void addAnalyzeCommand(CLI::App& root, Action& action);
void addExportCommand(CLI::App& root, Action& action);
void addEvaluateCommand(CLI::App& root, Action& action);
void addTrainCommand(CLI::App& root, Action& action);
void addEditCommand(CLI::App& root, Action& action);
void addLogCommand(CLI::App& root, Action& action);
void addVerifyCommand(CLI::App& root, Action& action);
void addSignoffCommand(CLI::App& root, Action& action);
void addUndoCommand(CLI::App& root, Action& action);
void addRedoCommand(CLI::App& root, Action& action);
void addMergeCommand(CLI::App& root, Action& action);

}  // namespace budledger::cli
