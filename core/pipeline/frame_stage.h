#pragma once
// FrameStage: the extension point of analyzePosition() for work that needs
// every frame's registered trap crops — the engine's measurement,
// classification and proposal stages plug in here. The pipeline calls, in
// order: begin() once, frame() for frames 0..T-1 in order (on the pipeline's
// own thread, while the next frames are being decoded on another), then
// commit() inside the transaction that writes the position, so a stage's
// results land in the project together with the position or not at all.
// A stage must not keep references to the crops past frame(): their buffers
// are reused for the next frame. The drift of frame k is final when frame(k)
// is called (the pipeline refines it in the same pass); confidences, focus
// and flags are final from begin() on.
#include <string>
#include <string_view>
#include <vector>

#include <opencv2/core.hpp>

#include "core/io/frame_source.h"
#include "core/register/drift.h"
#include "core/store/project.h"
#include "core/traps/crops.h"
#include "core/traps/trap_layout.h"

namespace budledger::pipeline {

// What the stages know about the position being analysed.
struct PositionContext {
  int positionId = 0;  // 0 until the position is written; valid in commit()
  std::string name;
  const io::StackInfo* info = nullptr;
  const registration::DriftTrack* drift = nullptr;
  const traps::TrapLayout* layout = nullptr;
  double intervalMin = 0;  // 0 when unknown
  double pixelUm = 0;      // 0 when unknown
};

struct FrameView {
  int frame = 0;
  const cv::Mat* image = nullptr;  // the whole frame as decoded
  const registration::FrameDrift* drift = nullptr;
  // One per trap, in layout order (= trap id): the stage's cropWindow() of the crop box.
  const std::vector<cv::Mat>* crops = nullptr;
};

class FrameStage {
 public:
  virtual ~FrameStage() = default;
  virtual std::string_view name() const = 0;
  // How the crops handed to frame() are resampled.
  virtual traps::CropSampling sampling() const { return traps::CropSampling::Nearest; }
  // The part of the layout's crop box (in its pixels) the stage looks at, asked after
  // begin(); empty for all of it. Cutting only that part saves resampling the rest.
  virtual cv::Rect cropWindow() const { return {}; }
  virtual void begin(const PositionContext& context) = 0;
  virtual void frame(const FrameView& view) = 0;
  virtual void commit(store::Project& project, const PositionContext& context) = 0;
};

}  // namespace budledger::pipeline
