#include "demo/simulator.h"

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <cstdio>
#include <exception>
#include <fstream>
#include <mutex>
#include <thread>

#include "core/base/error.h"
#include "demo/optics.h"
#include "demo/scene.h"
#include "demo/tiff_writer.h"

namespace budledger::demo {
namespace {

Rng positionRng(const Scenario& s, const PositionSpec& spec) {
  return Rng(s.seed).derive("position", static_cast<std::uint64_t>(spec.index));
}

void writeText(const std::filesystem::path& p, const std::string& text) {
  std::ofstream out(p, std::ios::binary);
  out << text;
  if (!out) throw InputError(p.string(), std::nullopt, "cannot be written");
}

}  // namespace

PositionModel modelPosition(const Scenario& s, const PositionSpec& spec) {
  const Rng root = positionRng(s, spec);
  const BiologyParams& bio = s.groups[static_cast<std::size_t>(spec.groupIndex)].biology;
  PositionModel m{
      spec, Device(s.device, 0.5 * bio.motherDiameterUm, root.derive("device")), {}, {}};
  const auto& d = s.device;
  const double cupRadius = d.postShape == "arc" ? 0.5 * d.inletUm + 0.15 : 0.5 * d.inletUm - 0.1;
  const Rng lifeRng = root.derive("biology");
  for (const auto& trap : m.device.traps()) {
    m.lives.push_back(simulateTrap(bio, s.frames, s.intervalMin, cupRadius,
                                   lifeRng.derive("trap", static_cast<std::uint64_t>(trap.id))));
    appendTrapTruth(trap.id, m.lives.back(), s.frames, s.intervalMin, m.truth);
  }
  return m;
}

std::vector<Vec2> renderPosition(const Scenario& s, const PositionModel& model,
                                 const FrameSink& frameSink) {
  const Rng root = positionRng(s, model.spec);
  const BiologyParams& bio = s.groups[static_cast<std::size_t>(model.spec.groupIndex)].biology;
  Renderer renderer(model.device, s.optics, s.frames, root.derive("optics"));
  SceneBuilder scene(model.device, model.lives, bio, s.intervalMin, root.derive("scene"));
  std::vector<CellBody> cells;
  std::vector<std::uint16_t> pixels;
  for (int k = 0; k < s.frames; ++k) {
    cells.clear();
    scene.build(k, renderer.drift()[static_cast<std::size_t>(k)], cells);
    renderer.render(k, cells, pixels);
    frameSink(k, pixels);
  }
  return renderer.drift();
}

void simulateExperiment(const Scenario& s, const std::filesystem::path& outDir,
                        const SimulateOptions& options) {
  std::error_code ec;
  std::filesystem::create_directories(outDir, ec);
  if (ec)
    throw InputError(outDir.string(), std::nullopt, "cannot create the folder: " + ec.message());
  const auto positions = positionsOf(s);
  const long totalFrames = static_cast<long>(positions.size()) * s.frames;
  std::atomic<long> done{0};
  std::mutex progressMutex;
  auto report = [&] {
    std::lock_guard lock(progressMutex);
    options.progress("simulate",
                     static_cast<double>(done.load()) / static_cast<double>(totalFrames));
  };

  auto runOne = [&](const PositionSpec& spec) {
    const PositionModel model = modelPosition(s, spec);
    const auto truthDir = outDir / "truth" / spec.name;
    std::vector<Vec2> drift;
    if (options.writeImages) {
      OmeTiffInfo info;
      info.imageName = spec.name;
      info.width = model.device.width();
      info.height = model.device.height();
      info.frames = s.frames;
      info.intervalMin = s.intervalMin;
      info.pixelUm = s.device.pixelUm;
      info.compression = s.compression;
      OmeTiffWriter writer(outDir / (spec.name + ".ome.tif"), info);
      drift = renderPosition(s, model, [&](int, const std::vector<std::uint16_t>& px) {
        writer.writeFrame(px.data());
        ++done;
        report();
      });
      writer.close();
    } else {
      Renderer renderer(model.device, s.optics, s.frames, positionRng(s, spec).derive("optics"));
      drift = renderer.drift();
    }
    writeTruth(truthDir, model.device, model.truth, drift);
  };

  const int jobs = std::max(1, std::min<int>(options.jobs, static_cast<int>(positions.size())));
  if (jobs == 1) {
    for (const auto& p : positions) runOne(p);
  } else {
    std::atomic<std::size_t> next{0};
    std::exception_ptr failure;
    std::mutex failureMutex;
    std::vector<std::thread> pool;
    for (int j = 0; j < jobs; ++j)
      pool.emplace_back([&] {
        for (std::size_t i = next++; i < positions.size(); i = next++) {
          try {
            runOne(positions[i]);
          } catch (...) {
            std::lock_guard lock(failureMutex);
            if (!failure) failure = std::current_exception();
            next = positions.size();
          }
        }
      });
    for (auto& t : pool) t.join();
    if (failure) std::rethrow_exception(failure);
  }

  std::string csv = "position,group,file,frames,interval_min,pixel_um\n";
  for (const auto& p : positions)
    csv += fmt::format("{},{},{}.ome.tif,{},{},{}\n", p.name, p.group, p.name, s.frames,
                       s.intervalMin, s.device.pixelUm);
  writeText(outDir / "positions.csv", csv);
  writeText(outDir / "scenario.json", scenarioToJsonText(s));
}

}  // namespace budledger::demo
