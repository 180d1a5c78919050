#pragma once
// A fresh simulated position run through the real pipeline and engine and
// scored against its truth: the engine's accuracy on data it was not tuned on.
#include <filesystem>
#include <string>

#include "core/engine/engine_stage.h"
#include "core/evaluate/score.h"
#include "core/evaluate/truth.h"
#include "core/io/frame_source.h"
#include "core/pipeline/analyze.h"
#include "core/traps/traps_csv.h"
#include "demo/scenario.h"
#include "demo/simulator.h"

namespace budledger::engine::testing {

// With `findLattice` the trap lattice is found by the pipeline, as `analyze` does;
// otherwise the truth's cup centres are the layout, which measures the engine alone.
inline evaluate::Score simulateAndScore(demo::Scenario scenario, const std::string& tag,
                                        bool findLattice = false,
                                        const evaluate::ScoreOptions& scoring = {}) {
  namespace fs = std::filesystem;
  const fs::path dir = fs::temp_directory_path() / ("budledger-engine-" + tag);
  fs::remove_all(dir);
  demo::SimulateOptions so;
  so.jobs = 1;
  demo::simulateExperiment(scenario, dir, so);
  const evaluate::Truth truth = evaluate::readTruth(dir.string());
  std::vector<evaluate::EnginePosition> engine;
  for (const auto& tp : truth.positions) {
    auto source = io::openStack((dir / tp.file).string(), {});
    EngineStage stage(EngineOptions{}, measure::OccupancyModel::builtIn());
    pipeline::AnalyzeOptions options;
    options.positionName = tp.name;
    options.digests = false;
    const fs::path trapsFile = dir / "truth" / tp.name / "traps.csv";
    const auto supplied = traps::readTrapsCsv(trapsFile);
    if (!findLattice) {
      options.suppliedTraps = &supplied;
      options.suppliedTrapsFile = trapsFile;
    }
    std::vector<pipeline::FrameStage*> stages{&stage};
    const auto a = pipeline::analyzeFrames(*source, options, {}, stages);
    evaluate::EnginePosition e;
    e.name = tp.name;
    e.frames = a.info.frames;
    for (const auto& t : a.layout.traps) e.traps.push_back({t.id, t.centre.x, t.centre.y});
    e.events = stage.takeResult().events;
    engine.push_back(std::move(e));
  }
  fs::remove_all(dir);
  return evaluate::score(truth, engine, scoring);
}

}  // namespace budledger::engine::testing
