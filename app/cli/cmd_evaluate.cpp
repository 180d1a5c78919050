// budledger-cli evaluate --truth DIR --project P.budledger — scores the
// project's latest engine run against simulator truth (core/evaluate) and
// prints the tables of docs/validation.md.
#include <fmt/format.h>

#include <fstream>
#include <memory>
#include <string>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/evaluate/score.h"
#include "core/evaluate/truth.h"
#include "core/store/project.h"

namespace budledger::cli {
namespace {

struct EvaluateArgs {
  std::string truth;
  std::string project;
  std::string json;
  int tolerance = 1;
};

int runEvaluate(const EvaluateArgs& args) {
  const evaluate::Truth truth = evaluate::readTruth(args.truth);
  auto project = store::Project::open(args.project, store::Database::Access::ReadOnly);
  const auto run = project.latestRun();
  if (!run) {
    printError(fmt::format("{}: no engine run to evaluate (run 'analyze' first)", args.project));
    return 1;
  }
  const auto proposals = project.proposals(run->id);
  std::vector<evaluate::EnginePosition> engine;
  for (const auto& p : project.positions()) {
    evaluate::EnginePosition e;
    e.name = p.name;
    e.frames = p.frameCount;
    for (const auto& t : project.traps(p.id)) e.traps.push_back({t.trap, t.x, t.y});
    for (const auto& ev : proposals)
      if (ev.position == p.id) e.events.push_back(ev);
    engine.push_back(std::move(e));
  }
  evaluate::ScoreOptions options;
  options.tolerance = args.tolerance;
  const evaluate::Score s = evaluate::score(truth, engine, options);
  fmt::print("Engine run {} ({}), engine {}, scored against {} (tolerance +-{} frame)\n\n", run->id,
             run->startedUtc, run->engineVersion, args.truth, args.tolerance);
  fmt::print("{}", evaluate::toMarkdown(s));
  if (!args.json.empty()) {
    std::ofstream out(args.json);
    out << evaluate::toJson(s) << "\n";
    if (!out) {
      printError(fmt::format("{}: cannot write the JSON report", args.json));
      return 1;
    }
  }
  return 0;
}

}  // namespace

void addEvaluateCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "evaluate", "Score the latest engine run of a project against simulator truth");
  auto args = std::make_shared<EvaluateArgs>();
  sub->add_option("--truth", args->truth, "Simulator output folder (positions.csv, truth/)")
      ->required()
      ->check(CLI::ExistingDirectory);
  sub->add_option("--project", args->project, "Project file (.budledger)")
      ->required()
      ->check(CLI::ExistingFile);
  sub->add_option("--json", args->json, "Also write the scores as JSON to this file");
  sub->add_option("--tolerance", args->tolerance, "Frames an event may be off and still match")
      ->check(CLI::Range(0, 10));
  sub->callback([&action, args] { action = [args] { return runEvaluate(*args); }; });
}

}  // namespace budledger::cli
