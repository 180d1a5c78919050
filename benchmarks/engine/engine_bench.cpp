// bench_engine [--quick]: times the engine on simulated positions.
//  1. End to end: a 240-frame, 42-trap, about 1000x700 px position of the demo scenario from its
//     OME-TIFF through read, registration, trap finding and the engine (as
//     `analyze` does, without writing the project), with 1 and 2 threads.
//  2. Scaling: the engine alone on the buffered crops of positions with 12, 24
//     and 42 traps and 60, 120 and 240 frames.
// Reports wall seconds, trap-frames per second and process CPU seconds (all
// threads); the machine is shared, so compare ratios within one run.
#include <fmt/format.h>

#include <opencv2/core.hpp>

#include <chrono>
#include <ctime>
#include <filesystem>
#include <string>
#include <vector>

#include "core/engine/engine_stage.h"
#include "core/io/frame_source.h"
#include "core/pipeline/analyze.h"
#include "demo/scenario.h"
#include "demo/simulator.h"

namespace {

using namespace budledger;
namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;

double since(Clock::time_point t) {
  return std::chrono::duration<double>(Clock::now() - t).count();
}

// A stage that only keeps the crops, for timing the engine alone afterwards.
class KeepCrops : public pipeline::FrameStage {
 public:
  std::string_view name() const override { return "keep"; }
  traps::CropSampling sampling() const override { return traps::CropSampling::Linear; }
  void begin(const pipeline::PositionContext& c) override {
    context = c;
    crops.assign(c.layout->traps.size(),
                 std::vector<cv::Mat>(static_cast<std::size_t>(c.info->frames)));
    informative.assign(static_cast<std::size_t>(c.info->frames), true);
  }
  void frame(const pipeline::FrameView& v) override {
    for (std::size_t i = 0; i < crops.size(); ++i)
      (*v.crops)[i].copyTo(crops[i][static_cast<std::size_t>(v.frame)]);
    informative[static_cast<std::size_t>(v.frame)] = engine::frameIsInformative(*v.drift);
  }
  void commit(store::Project&, const pipeline::PositionContext&) override {}
  pipeline::PositionContext context;
  std::vector<std::vector<cv::Mat>> crops;
  std::vector<bool> informative;
};

fs::path simulate(int rows, int cols, int frames, const fs::path& root, cv::Point2d pitchUm = {}) {
  demo::Scenario s =
      demo::loadScenario(fs::path(BUDLEDGER_SOURCE_DIR) / "demo/scenarios/demo.json");
  s.device.rows = rows;
  s.device.cols = cols;
  s.frames = frames;
  if (pitchUm.x > 0) {  // a wider lattice fills a larger field, cells keep their size
    s.device.pitchXUm = pitchUm.x;
    s.device.pitchYUm = pitchUm.y;
  }
  s.groups.resize(1);
  s.groups[0].positions = 1;
  const fs::path dir = root / fmt::format("{}x{}x{}-{}", rows, cols, frames, pitchUm.x);
  demo::SimulateOptions so;
  so.jobs = 2;
  demo::simulateExperiment(s, dir, so);
  for (const auto& e : fs::directory_iterator(dir))
    if (e.path().extension() == ".tif") return e.path();
  return {};
}

}  // namespace

int main(int argc, char** argv) {
  cv::setNumThreads(
      1);  // as budledger-cli analyze does: the pipeline and engine run their own threads
  const bool quick = argc > 1 && std::string(argv[1]) == "--quick";
  const fs::path root = fs::temp_directory_path() / "budledger-bench-engine";
  fs::remove_all(root);
  const auto model = measure::OccupancyModel::builtIn();

  fmt::print("## End to end (read, register, traps, engine), demo optics\n\n");
  fmt::print(
      "| traps x frames | threads | seconds | trap-frames/s | survey | registration | traps | "
      "crops + engine | engine | CPU s |\n|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|\n");
  // The Engine issue's size: 42 traps in a field of about 1000 x 700 px (33 x 27 um
  // pitch at 0.25 um/px; the demo's own 18 x 20 um gives 558 x 531 px).
  const fs::path demoStack = simulate(6, 7, quick ? 60 : 240, root, {33, 27});
  for (int threads : {1, 2}) {
    auto source = io::openStack(demoStack, {});
    engine::EngineOptions eo;
    eo.threads = threads;
    engine::EngineStage stage(eo, model);
    pipeline::AnalyzeOptions options;
    options.digests = false;
    std::vector<pipeline::FrameStage*> stages{&stage};
    const auto t = Clock::now();
    const std::clock_t cpu = std::clock();
    const auto a = pipeline::analyzeFrames(*source, options, {}, stages);
    const double s = since(t);
    const double cpuS = static_cast<double>(std::clock() - cpu) / CLOCKS_PER_SEC;
    const double engineS = stage.takeResult().seconds;
    const double tf = static_cast<double>(a.layout.traps.size()) * a.info.frames;
    fmt::print(
        "| {} x {} ({}x{} px) | {} | {:.2f} | {:.0f} | {:.2f} | {:.2f} | {:.2f} | {:.2f} | {:.2f} "
        "| {:.1f} |\n",
        a.layout.traps.size(), a.info.frames, a.info.width, a.info.height, threads, s, tf / s,
        a.seconds.survey, a.seconds.registration, a.seconds.traps, a.seconds.stages, engineS, cpuS);
    std::fflush(stdout);
  }

  fmt::print("\n## Engine alone (crops in memory), 2 threads\n\n");
  fmt::print("| traps | frames | seconds | trap-frames/s |\n|---:|---:|---:|---:|\n");
  const std::vector<std::pair<int, int>> layouts =
      quick ? std::vector<std::pair<int, int>>{{2, 6}}
            : std::vector<std::pair<int, int>>{{2, 6}, {4, 6}, {6, 7}};
  const std::vector<int> lengths = quick ? std::vector<int>{60} : std::vector<int>{60, 120, 240};
  for (const auto& [rows, cols] : layouts)
    for (int frames : lengths) {
      const fs::path stack = simulate(rows, cols, frames, root);
      auto source = io::openStack(stack, {});
      KeepCrops keep;
      pipeline::AnalyzeOptions options;
      options.digests = false;
      std::vector<pipeline::FrameStage*> stages{&keep};
      const auto a = pipeline::analyzeFrames(*source, options, {}, stages);
      engine::EngineInputs in;
      in.intervalMin = keep.context.intervalMin;
      in.pixelUm = keep.context.pixelUm;
      in.cup = {-static_cast<double>(a.layout.crop.x), -static_cast<double>(a.layout.crop.y)};
      for (const auto& tr : a.layout.traps) in.trapIds.push_back(tr.id);
      in.crops = &keep.crops;
      in.informative = keep.informative;
      engine::EngineOptions eo;
      eo.threads = 2;
      const auto t = Clock::now();
      const auto r = engine::runEngine(in, eo, model);
      const double s = since(t);
      fmt::print("| {} | {} | {:.2f} | {:.0f} |\n", in.trapIds.size(), frames, s,
                 static_cast<double>(in.trapIds.size()) * frames / s);
      std::fflush(stdout);
      fs::remove_all(stack.parent_path());
    }
  fs::remove_all(root);
  return 0;
}
