#pragma once
// runEngine: the engine over one position's registered trap crops —
// background per trap, calibration of the position (noise, outline sign,
// mother size), cells in every crop, occupancy probabilities, evidence, and
// events from the temporal model. It owns no I/O: the pipeline stage
// (engine_stage.h) feeds it crops and writes what it returns, and tests and
// benchmarks call it directly.
//
// Invariants: events and measurements use the trap ids given; a frame marked
// uninformative yields a measurement flagged so and no evidence; a position
// whose backgrounds could not be learned says so in `note` (the events are
// still proposed, against the lattice median, and every trap is flagged).
#include <nlohmann/json.hpp>
#include <opencv2/core.hpp>
#include <string>
#include <vector>

#include "core/base/events.h"
#include "core/base/progress.h"
#include "core/measure/features.h"
#include "core/measure/occupancy.h"
#include "core/measure/segment.h"
#include "core/propose/proposer.h"
#include "core/store/project.h"

namespace budledger::engine {

struct EngineOptions {
  double motherDiameterUm = 4.4;  // starting guess (common practice), refined from the data
  int backgroundSamples = 16;     // frames per trap the background is learned from
  // Side of the square around the cup that is measured (0: the whole crop). A mother,
  // a bud and a daughter beside her lie within ~2 mother diameters of the seat; a wider
  // lattice cell (sparse arrays) only adds pixels without evidence about her events.
  double windowUm = 20;
  double lodgedMin = 150;  // an unchanging neighbour for this long is not a bud
  measure::SegmentParams segment;
  propose::ProposeOptions propose;
  int threads = 0;            // 0: all hardware threads
  bool keepFeatures = false;  // return every trap-frame's features (training, diagnostics)
};

struct EngineInputs {
  int position = 0;
  double intervalMin = 10;
  double pixelUm = 0.25;
  cv::Point2d cup;  // cup centre in crop pixels
  cv::Point
      cropOrigin;  // the crops' corner within the layout's crop box (cell x, y are given there)
  std::vector<int> trapIds;                                  // one per crop series
  const std::vector<std::vector<cv::Mat>>* crops = nullptr;  // [trap][frame], one size
  std::vector<bool> informative;                             // per frame (focus, registration)
};

struct TrapFlag {
  int trap = 0;
  std::string reason;
};

struct EngineResult {
  std::vector<Event> events;
  std::vector<store::MeasurementRecord> measurements;  // position set, run id not
  std::vector<TrapFlag> flags;
  nlohmann::json calibration;  // what was learned from the data
  std::string note;            // a position-level problem, empty when none
  double seconds = 0;
  std::vector<std::vector<measure::FrameFeatures>> features;  // [trap][frame] if kept
  std::vector<propose::TrapEvidence> evidence;                // [trap] if kept
};

EngineResult runEngine(const EngineInputs& inputs, const EngineOptions& options,
                       const measure::OccupancyModel& model, const Progress& progress = {});

// The engine's parameters as JSON for the engine run record.
nlohmann::json parametersJson(const EngineOptions& options);

}  // namespace budledger::engine
