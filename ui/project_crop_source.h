#pragma once
// ProjectCropSource: the workstation's CropSource — registered crops of a
// project's traps read from the input stacks the project records (the
// inputs table), moved by the stored drift, through core/io and
// core/traps. Frames are decoded by per-thread clones of each position's
// FrameSource and kept in a small shared cache bounded in bytes, so the
// strips' many traps of one frame cost one decode. All positions share one
// crop size (the largest of their crop boxes). Thread-safe.
#include <QString>
#include <list>
#include <map>
#include <memory>
#include <mutex>
#include <opencv2/core.hpp>
#include <vector>

#include "core/io/frame_source.h"
#include "core/store/project.h"
#include "ui/crop_source.h"

namespace budledger::ui {

struct ProjectCropOptions {
  std::size_t frameCacheBytes = std::size_t{192} << 20;
};

class ProjectCropSource : public CropSource {
 public:
  // Opens every position's inputs. Throws InputError naming the file when an
  // input is missing or unreadable, or when the project has no positions.
  static std::shared_ptr<ProjectCropSource> open(store::Project& project,
                                                 ProjectCropOptions options = {});
  ~ProjectCropSource() override;

  QSize cropSize() const override { return {box_.width, box_.height}; }
  QImage crop(TrapId trap, int frame) const override;
  QPointF measurementOrigin(int position) const override;
  // The crop as core sees it (CV_8U or CV_16U), for tests.
  cv::Mat cropMat(TrapId trap, int frame) const;

  // The crop box (relative to a trap centre) a position's traps are cut with:
  // the project's stored box when it has one ("position.<name>.crop_box" =
  // "x y w h"), else a box the size of the trap lattice's cell, estimated
  // from the spacing of neighbouring traps.
  static cv::Rect cropBoxFor(store::Project& project, const store::PositionRecord& position);

 private:
  struct Position;
  ProjectCropSource() = default;
  std::shared_ptr<const cv::Mat> frame(const Position& p, int frame) const;

  std::map<int, std::unique_ptr<Position>> positions_;
  std::map<int, cv::Rect> engineBoxes_;  // each position's own crop box
  cv::Rect box_;
  ProjectCropOptions options_;

  mutable std::mutex cacheMutex_;
  struct CachedFrame {
    int position = 0;
    int frame = 0;
    std::shared_ptr<const cv::Mat> image;
  };
  mutable std::list<CachedFrame> cache_;  // front = most recent
  mutable std::size_t cacheBytes_ = 0;
};

}  // namespace budledger::ui
