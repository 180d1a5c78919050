// budledger-cli train-occupancy --truth DIR... --out MODEL.json — fits the
// occupancy classifier (core/measure/occupancy.h) on simulated stacks whose
// truth is known. Each position runs through the same pipeline and engine as
// `analyze`, so the features are those the model will see; frames are
// labelled empty / single / budded from the truth's events, dead mothers and
// uninformative frames are left out. Deterministic: the same folders give the
// same model. Prints the accuracy and a reliability table on the positions
// held out (every other one) and on all of them.
#include <fmt/format.h>

#include <filesystem>
#include <fstream>
#include <memory>
#include <string>
#include <vector>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/engine/engine_stage.h"
#include "core/evaluate/score.h"
#include "core/evaluate/truth.h"
#include "core/io/frame_source.h"
#include "core/measure/occupancy.h"
#include "core/pipeline/analyze.h"

namespace budledger::cli {
namespace {

struct TrainArgs {
  std::vector<std::string> truth;
  std::string out;
};

struct Labelled {
  measure::TrainingExample example;
  bool heldOut = false;
};

void report(const std::string& title, const measure::OccupancyModel& m,
            const std::vector<measure::TrainingExample>& data) {
  if (data.empty()) return;
  int correct = 0;
  constexpr int kBins = 5;
  std::array<int, kBins> count{}, hits{};
  std::array<double, kBins> conf{};
  for (const auto& d : data) {
    const auto p = m.predictThree(d.x);
    const int best = static_cast<int>(std::max_element(p.begin(), p.end()) - p.begin());
    correct += best == d.label;
    // Reliability of every class probability (one-vs-rest).
    for (int c = 0; c < 3; ++c) {
      const double q = p[static_cast<std::size_t>(c)];
      const int b = std::min(kBins - 1, static_cast<int>(q * kBins));
      ++count[static_cast<std::size_t>(b)];
      hits[static_cast<std::size_t>(b)] += d.label == c;
      conf[static_cast<std::size_t>(b)] += q;
    }
  }
  fmt::print("{}: {} frames, accuracy {:.3f}\n  probability  n  mean  observed\n", title,
             data.size(), static_cast<double>(correct) / data.size());
  for (int b = 0; b < kBins; ++b)
    if (count[static_cast<std::size_t>(b)])
      fmt::print("  {:.1f}-{:.1f}  {}  {:.3f}  {:.3f}\n", b / double(kBins),
                 (b + 1) / double(kBins), count[static_cast<std::size_t>(b)],
                 conf[static_cast<std::size_t>(b)] / count[static_cast<std::size_t>(b)],
                 static_cast<double>(hits[static_cast<std::size_t>(b)]) /
                     count[static_cast<std::size_t>(b)]);
}

int runTrain(const TrainArgs& args) {
  std::vector<Labelled> all;
  int positionIndex = 0;
  TerminalProgress bar;
  for (const auto& folder : args.truth) {
    const evaluate::Truth truth = evaluate::readTruth(folder);
    for (const auto& tp : truth.positions) {
      auto source = io::openStack((std::filesystem::path(folder) / tp.file).string(), {});
      engine::EngineOptions eo;
      eo.keepFeatures = true;
      engine::EngineStage stage(eo, measure::OccupancyModel::builtIn());
      pipeline::AnalyzeOptions options;
      options.positionName = tp.name;
      options.digests = false;
      std::vector<pipeline::FrameStage*> stages{&stage};
      Progress sink = bar.sink();
      const auto a = pipeline::analyzeFrames(*source, options, sink, stages);
      const engine::EngineResult r = stage.takeResult();
      std::vector<evaluate::EngineTrap> traps;
      for (const auto& t : a.layout.traps) traps.push_back({t.id, t.centre.x, t.centre.y});
      const auto pairs = evaluate::pairTraps(tp.traps, traps);
      const bool heldOut = positionIndex++ % 2 == 1;
      for (std::size_t i = 0; i < tp.traps.size(); ++i) {
        if (pairs[i] < 0 || r.features.empty()) continue;
        const auto labels = evaluate::truthOccupancy(tp, tp.traps[i].trap);
        const auto& f = r.features[static_cast<std::size_t>(pairs[i])];
        const auto& ev = r.evidence[static_cast<std::size_t>(pairs[i])];
        for (std::size_t t = 0; t < f.size() && t < labels.size(); ++t)
          if (labels[t] >= 0 && ev[t].informative) all.push_back({{f[t].x, labels[t]}, heldOut});
      }
    }
  }
  if (all.empty()) {
    printError("no labelled frames: check the --truth folders");
    return 1;
  }
  std::vector<measure::TrainingExample> train, held, every;
  for (const auto& l : all) {
    (l.heldOut ? held : train).push_back(l.example);
    every.push_back(l.example);
  }
  // Validate on held-out positions, then refit on everything for the shipped model.
  if (!held.empty() && !train.empty())
    report("held-out positions", measure::OccupancyModel::train(train, {}), held);
  const auto model = measure::OccupancyModel::train(every, {});
  report("all positions (training fit)", model, every);
  std::ofstream out(args.out);
  out << model.toJson() << "\n";
  if (!out) {
    printError(fmt::format("{}: cannot write the model", args.out));
    return 1;
  }
  fmt::print("wrote {}\n", args.out);
  return 0;
}

}  // namespace

void addTrainCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "train-occupancy", "Fit the occupancy classifier on simulated stacks with known truth");
  auto args = std::make_shared<TrainArgs>();
  sub->add_option("--truth", args->truth, "Simulator output folders")
      ->required()
      ->check(CLI::ExistingDirectory);
  sub->add_option("--out", args->out, "Model file to write (JSON)")->required();
  sub->callback([&action, args] { action = [args] { return runTrain(*args); }; });
}

}  // namespace budledger::cli
