// budledger-cli simulate — generate a synthetic trap-array experiment with
// known truth (demo/simulator.h), from a scenario file or from a seed and a
// difficulty preset.
#include <fmt/format.h>

#include <algorithm>
#include <memory>
#include <optional>
#include <string>
#include <thread>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "demo/scenario.h"
#include "demo/simulator.h"

namespace budledger::cli {
namespace {

struct SimulateArgs {
  std::string scenario;
  std::string out;
  std::optional<std::uint64_t> seed;
  std::optional<int> rows, cols, frames, positions;
  std::string difficulty = "normal";
  int jobs = static_cast<int>(std::clamp(std::thread::hardware_concurrency(), 1u, 4u));
  bool listParameters = false;
};

}  // namespace

void addSimulateCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "simulate", "Generate a synthetic experiment (OME-TIFF stacks plus ground truth)");
  auto a = std::make_shared<SimulateArgs>();
  auto* scenario =
      sub->add_option("--scenario", a->scenario, "Scenario JSON file")->check(CLI::ExistingFile);
  auto* seed =
      sub->add_option("--seed", a->seed, "Seed for a preset scenario (instead of --scenario)");
  scenario->excludes(seed);
  sub->add_option("--out", a->out, "Output folder (created; existing files are overwritten)");
  sub->add_option("--rows", a->rows, "Trap rows (overrides the scenario)")
      ->check(CLI::Range(1, 60));
  sub->add_option("--cols", a->cols, "Trap columns (overrides the scenario)")
      ->check(CLI::Range(1, 60));
  sub->add_option("--frames", a->frames, "Frames per position (overrides the scenario)")
      ->check(CLI::Range(1, 100000));
  sub->add_option("--positions", a->positions, "Positions per group (overrides the scenario)")
      ->check(CLI::Range(1, 1000));
  sub->add_option("--difficulty", a->difficulty, "Preset for --seed: easy, normal or hard")
      ->check(CLI::IsMember({"easy", "normal", "hard"}));
  sub->add_option("--jobs", a->jobs, "Positions generated in parallel (default: cores, at most 4)")
      ->check(CLI::Range(1, 64));
  sub->add_flag("--list-parameters", a->listParameters,
                "Print every scenario parameter with its default and source, as Markdown");

  sub->callback([&action, a] {
    action = [a]() -> int {
      if (a->listParameters) {
        fmt::print("{}", demo::parameterTableMarkdown());
        return 0;
      }
      if (a->out.empty()) {
        printError("simulate: --out is required (see budledger-cli simulate --help)");
        return 2;
      }
      if (a->scenario.empty() && !a->seed) {
        printError(
            "simulate: give --scenario FILE or --seed N (see budledger-cli simulate --help)");
        return 2;
      }
      demo::Scenario s;
      if (!a->scenario.empty()) {
        s = demo::loadScenario(a->scenario);
      } else {
        const auto d = a->difficulty == "easy"   ? demo::Difficulty::Easy
                       : a->difficulty == "hard" ? demo::Difficulty::Hard
                                                 : demo::Difficulty::Normal;
        s = demo::presetScenario(*a->seed, d);
      }
      if (a->rows) s.device.rows = *a->rows;
      if (a->cols) s.device.cols = *a->cols;
      if (a->frames) s.frames = *a->frames;
      if (a->positions)
        for (auto& g : s.groups) g.positions = *a->positions;
      demo::validate(s, a->scenario.empty() ? "command line" : a->scenario);

      TerminalProgress bar;
      demo::SimulateOptions options;
      options.jobs = a->jobs;
      options.progress = bar.sink();
      demo::simulateExperiment(s, a->out, options);
      return 0;
    };
  });
}

}  // namespace budledger::cli
