#pragma once
// EngineStage: the engine as a pipeline stage. It keeps every registered trap
// crop of a position (16-bit, the frame's type), runs runEngine() when the
// last frame has arrived, and on commit() remembers the position id; after
// all positions, writeRun() stores one engine run with the proposals and the
// measurements of every position, so `latestRun()` covers the whole analysis.
//
// Invariants: results are written only by writeRun(), inside the caller's
// transaction; a position whose registration failed on most frames gets no
// proposals, a note, and every trap flagged (it is reported, not guessed).
#include <string>
#include <vector>

#include "core/engine/position_engine.h"
#include "core/pipeline/frame_stage.h"

namespace budledger::engine {

struct PositionOutcome {
  int positionId = 0;
  std::string name;
  int frames = 0;
  EngineResult result;
};

class EngineStage : public pipeline::FrameStage {
 public:
  EngineStage(EngineOptions options, measure::OccupancyModel model, Progress progress = {});

  std::string_view name() const override { return "engine"; }
  traps::CropSampling sampling() const override { return traps::CropSampling::Linear; }
  cv::Rect cropWindow() const override { return window_; }
  void begin(const pipeline::PositionContext& context) override;
  void frame(const pipeline::FrameView& view) override;
  void commit(store::Project& project, const pipeline::PositionContext& context) override;

  // Where the engine's own progress goes (per position).
  void setProgress(Progress progress) { progress_ = std::move(progress); }
  // One engine run for every committed position; returns its id (0 when none).
  std::int64_t writeRun(store::Project& project);
  const std::vector<PositionOutcome>& outcomes() const { return outcomes_; }
  // The last position's result when it is not being written (training, dry runs).
  EngineResult takeResult() { return std::move(pending_); }

 private:
  void run();

  EngineOptions options_;
  measure::OccupancyModel model_;
  Progress progress_;
  pipeline::PositionContext context_;
  int frames_ = 0;
  cv::Point2d cup_;                          // in window coordinates
  cv::Rect window_;                          // the part of the layout's crop box that is kept
  std::vector<std::vector<cv::Mat>> crops_;  // [trap][frame]
  std::vector<bool> informative_;
  std::vector<int> trapIds_;
  EngineResult pending_;
  bool ran_ = false;
  std::vector<PositionOutcome> outcomes_;
};

// Whether a frame's registration and focus make its crops worth measuring.
bool frameIsInformative(const registration::FrameDrift& drift);

}  // namespace budledger::engine
