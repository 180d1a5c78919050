#include "ui/project_build.h"

#include <fmt/format.h>
#include <unistd.h>

#include <memory>
#include <set>

#include "core/base/error.h"
#include "core/engine/engine_stage.h"
#include "core/io/frame_source.h"
#include "core/measure/occupancy.h"
#include "core/pipeline/analyze.h"
#include "core/store/project.h"

namespace budledger::ui {
namespace {

void removeProjectFiles(const std::filesystem::path& p) {
  std::error_code ec;
  for (const char* suffix : {"", "-wal", "-shm", "-journal", ".lock"})
    std::filesystem::remove(p.string() + suffix, ec);
}

std::unique_ptr<io::FrameSource> openInput(const PositionInput& in) {
  if (in.folder) return io::openFolderPosition(*in.folder);
  return io::openStack(in.stack);
}

}  // namespace

std::string PositionInput::group() const {
  if (strain.empty()) return condition;
  if (condition.empty()) return strain;
  return strain + " / " + condition;
}

std::filesystem::path partialPathFor(const std::filesystem::path& target) {
  return target.parent_path() /
         fmt::format(".{}.partial-{}", target.filename().string(), ::getpid());
}

std::vector<std::string> buildProject(const NewProjectPlan& plan, const Progress& progress) {
  if (plan.positions.empty()) throw InputError("no images chosen: add stacks or a folder");
  if (plan.target.empty()) throw InputError("no project file chosen");
  std::error_code ec;
  if (std::filesystem::exists(plan.target, ec))
    throw InputError(plan.target.string(), std::nullopt,
                     "already exists; a new project never replaces a file");
  std::set<std::string> names;
  for (const auto& p : plan.positions)
    if (!names.insert(p.name).second)
      throw InputError(p.where().string(), std::nullopt,
                       fmt::format("a second input named position '{}'", p.name));

  // Open every input first so a missing or bad file fails before any work.
  std::vector<std::unique_ptr<io::FrameSource>> sources;
  for (const auto& p : plan.positions) sources.push_back(openInput(p));

  pipeline::AnalyzeOptions options;
  options.intervalMin = plan.intervalMin;
  options.pixelUm = plan.pixelUm;
  options.digests = plan.digests;
  engine::EngineStage engineStage(engine::EngineOptions{}, measure::OccupancyModel::builtIn());
  std::vector<pipeline::FrameStage*> stages{&engineStage};

  const std::filesystem::path building = partialPathFor(plan.target);
  removeProjectFiles(building);
  std::vector<std::string> lines;
  try {
    {
      auto project = store::Project::create(building.string());
      store::Transaction all(project.db());
      const size_t n = plan.positions.size();
      for (size_t i = 0; i < n; ++i) {
        const auto& in = plan.positions[i];
        const std::string label = fmt::format("{} ({}/{})", in.name, i + 1, n);
        Progress sink = progress;
        sink.report = [report = progress.report, label](std::string_view stage, double f) {
          if (report) report(fmt::format("{}: {}", label, stage), f);
        };
        options.positionName = in.name;
        options.group = in.group();
        engineStage.setProgress(sink);
        const auto a = pipeline::analyzePosition(project, *sources[i], options, sink, stages);
        const auto& outcome = engineStage.outcomes().back();
        lines.push_back(fmt::format("{}: {} frames, {} traps, {} events proposed{}{}", a.name,
                                    a.info.frames, a.layout.traps.size(),
                                    outcome.result.events.size(),
                                    outcome.result.note.empty() ? "" : "; ", outcome.result.note));
      }
      progress("storing the engine's results", 1.0);
      engineStage.writeRun(project);
      all.commit();
    }
    // The connection is closed (WAL folded back): publish under the real name.
    // link() fails rather than replace a file that appeared meanwhile.
    std::filesystem::create_hard_link(building, plan.target, ec);
    if (ec && !std::filesystem::exists(plan.target)) {
      // Folders without hard links: a rename, checked just before.
      ec.clear();
      std::filesystem::rename(building, plan.target, ec);
    }
    if (ec)
      throw InputError(plan.target.string(), std::nullopt,
                       fmt::format("cannot create the project: {}", ec.message()));
    removeProjectFiles(building);
  } catch (...) {
    removeProjectFiles(building);
    throw;
  }
  return lines;
}

}  // namespace budledger::ui
