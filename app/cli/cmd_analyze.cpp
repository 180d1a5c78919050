// budledger-cli analyze STACK.tif|FOLDER... --project P.budledger — runs the
// analysis (ingest, drift, trap lattice, then the engine: measure, classify,
// propose) over every position and writes them, with one engine run holding
// every position's proposals and measurements, into the project. A new
// project is built in a temporary file beside the target and renamed into
// place only when every position succeeded; an existing project gets all positions in one
// transaction. On failure nothing is left behind either way.
#include <fmt/format.h>
#include <unistd.h>
#include <opencv2/core/utility.hpp>

#include <cmath>
#include <filesystem>
#include <memory>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "core/base/error.h"
#include "core/engine/engine_stage.h"
#include "core/io/frame_source.h"
#include "core/io/image_folder.h"
#include "core/measure/occupancy.h"
#include "core/pipeline/analyze.h"
#include "core/store/project.h"
#include "core/traps/traps_csv.h"

namespace budledger::cli {
namespace {

struct AnalyzeArgs {
  std::vector<std::string> inputs;
  std::string project;
  std::optional<double> intervalMin, pixelUm;
  std::string traps, group, pattern, channel;
};

struct Position {
  std::string name;
  std::unique_ptr<io::FrameSource> source;
};

// Opens every input before any work, so a missing or bad file fails fast.
std::vector<Position> openInputs(const AnalyzeArgs& args) {
  io::OpenOptions open;
  open.channel = args.channel;
  std::vector<Position> out;
  std::set<std::string> names;
  for (const auto& input : args.inputs) {
    std::error_code ec;
    if (std::filesystem::is_directory(input, ec)) {
      for (const auto& fp : io::scanFolder(input, args.pattern, open)) {
        Position p{fp.name, io::openFolderPosition(fp, open)};
        out.push_back(std::move(p));
      }
    } else {
      auto source = io::openStack(input, open);
      Position p{source->info().positionName, std::move(source)};
      out.push_back(std::move(p));
    }
  }
  for (const auto& p : out)
    if (!names.insert(p.name).second)
      throw InputError(
          fmt::format("two inputs are both position '{}' (positions are named after "
                      "their files)",
                      p.name));
  return out;
}

void removeProjectFiles(const std::filesystem::path& p) {
  std::error_code ec;
  for (const char* suffix : {"", "-wal", "-shm", "-journal"})
    std::filesystem::remove(p.string() + suffix, ec);
}

std::string describe(const pipeline::PositionAnalysis& a) {
  double maxShift = 0;
  int interpolated = 0, jumps = 0;
  for (const auto& d : a.drift) {
    maxShift = std::max(maxShift, std::hypot(d.dx, d.dy));
    if (d.flags & registration::FrameDrift::kInterpolated) ++interpolated;
    if (d.flags & registration::FrameDrift::kJump) ++jumps;
  }
  int edge = 0;
  for (const auto& t : a.layout.traps) edge += t.edge ? 1 : 0;
  return fmt::format(
      "{}: {} frames of {}x{}, {} traps ({} at the edge, {}), drift up to {:.1f} px, {} jump{}, "
      "{} frame{} interpolated, {:.2f} s",
      a.name, a.info.frames, a.info.width, a.info.height, a.layout.traps.size(), edge,
      a.layout.source == traps::TrapLayout::Source::Supplied ? "supplied" : "detected", maxShift,
      jumps, jumps == 1 ? "" : "s", interpolated, interpolated == 1 ? "" : "s",
      a.seconds.total + a.seconds.write);
}

int runAnalyze(const AnalyzeArgs& args) {
  // The pipeline runs its own threads (decoding, digests beside
  // registration); OpenCV's worker pool on top only makes them queue.
  cv::setNumThreads(1);
  std::vector<Position> positions = openInputs(args);
  std::optional<std::vector<traps::SuppliedTrap>> supplied;
  if (!args.traps.empty()) supplied = traps::readTrapsCsv(args.traps);

  pipeline::AnalyzeOptions options;
  options.group = args.group;
  options.intervalMin = args.intervalMin;
  options.pixelUm = args.pixelUm;
  if (supplied) {
    options.suppliedTraps = &*supplied;
    options.suppliedTrapsFile = args.traps;
  }
  // The engine (measure, classify, propose) sees every frame's crops.
  engine::EngineStage engineStage(engine::EngineOptions{}, measure::OccupancyModel::builtIn());
  std::vector<pipeline::FrameStage*> stages{&engineStage};

  const std::filesystem::path target(args.project);
  const bool existing = std::filesystem::exists(target);
  std::filesystem::path building = target;
  if (!existing) {
    building = target.parent_path() /
               fmt::format(".{}.partial-{}", target.filename().string(), ::getpid());
    removeProjectFiles(building);
  }
  std::vector<std::string> lines;
  try {
    auto project = existing ? store::Project::open(target.string())
                            : store::Project::create(building.string());
    // All positions or none: one transaction (each position nests inside).
    store::Transaction all(project.db());
    TerminalProgress bar;
    for (size_t i = 0; i < positions.size(); ++i) {
      auto& p = positions[i];
      const std::string label = positions.size() > 1
                                    ? fmt::format("[{}/{}] {}", i + 1, positions.size(), p.name)
                                    : p.name;
      Progress sink = bar.sink();
      auto report = sink.report;
      sink.report = [report, label](std::string_view stage, double f) {
        report(fmt::format("{}: {}", label, stage), f);
      };
      options.positionName = p.name;
      engineStage.setProgress(sink);
      const auto a = pipeline::analyzePosition(project, *p.source, options, sink, stages);
      lines.push_back(describe(a));
      const auto& outcome = engineStage.outcomes().back();
      lines.push_back(
          fmt::format("{}: engine {:.2f} s, {} events proposed, {} trap{} flagged for review{}{}",
                      p.name, outcome.result.seconds, outcome.result.events.size(),
                      outcome.result.flags.size(), outcome.result.flags.size() == 1 ? "" : "s",
                      outcome.result.note.empty() ? "" : "; ", outcome.result.note));
    }
    const auto run = engineStage.writeRun(project);
    lines.push_back(fmt::format("engine run {} stored", run));
    all.commit();
  } catch (...) {
    if (!existing) removeProjectFiles(building);
    throw;
  }
  if (!existing) {
    // The project's connection is closed (WAL folded back); now publish it.
    if (std::filesystem::exists(target)) {
      removeProjectFiles(building);
      throw InputError(
          fmt::format("project '{}' appeared while analysing; not overwritten", target.string()));
    }
    std::filesystem::rename(building, target);
    removeProjectFiles(building);
  }
  for (const auto& l : lines) fmt::print("{}\n", l);
  fmt::print("wrote {} position{} to {}\n", positions.size(), positions.size() == 1 ? "" : "s",
             target.string());
  return 0;
}

}  // namespace

void addAnalyzeCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "analyze", "Register time-lapse stacks, find their traps and write them into a project");
  auto args = std::make_shared<AnalyzeArgs>();
  sub->add_option("inputs", args->inputs,
                  "Time-lapse stacks (multi-page TIFF / OME-TIFF / BigTIFF), one per position, or "
                  "folders of single-frame TIFFs")
      ->required();
  sub->add_option("--project", args->project, "Project file to create or add positions to")
      ->required();
  sub->add_option("--interval-min", args->intervalMin,
                  "Minutes between frames (overrides the stack's metadata)")
      ->check(CLI::PositiveNumber);
  sub->add_option("--pixel-um", args->pixelUm, "Pixel size in micrometres (overrides metadata)")
      ->check(CLI::PositiveNumber);
  sub->add_option("--traps", args->traps,
                  "CSV of trap centres (x,y; optional position,trap_id,row,col) to use instead of "
                  "the detected layout");
  sub->add_option("--group", args->group, "Group (strain or condition) of these positions");
  sub->add_option("--pattern", args->pattern,
                  "File name pattern for folders, e.g. '{position}_t{time}_c{channel}.tif'");
  sub->add_option("--channel", args->channel,
                  "Channel to analyse when the input has several (name or index)");
  sub->callback([&action, args] { action = [args] { return runAnalyze(*args); }; });
}

}  // namespace budledger::cli
