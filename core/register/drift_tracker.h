#pragma once
// DriftTracker: registers a movie frame by frame, in order, with continuity:
// each frame's search is centred on the last trustworthy shift, so slow drift
// and jumps smaller than the search radius are followed without ever looking
// a whole lattice pitch away. finish() turns the raw measurements into the
// position's drift track: confidences relative to the movie's own median
// match, frames that could not be measured (defocus, flicker, debris) and
// isolated outliers filled in from their neighbours, and shifts expressed
// relative to frame 0 whatever frame served as reference.
#include <vector>

#include <opencv2/core.hpp>

#include "core/register/drift.h"
#include "core/register/registrar.h"

namespace budledger::registration {

struct TrackOptions {
  // A frame whose match is below this fraction of the median match is
  // treated as unmeasurable and interpolated.
  double failFraction = 0.75;
  // A shift differing from both neighbours by more than this (px) while they
  // agree is an outlier.
  double outlierPx = 2.0;
  // Frames at least this sharp (relative focus) lose no confidence for blur.
  double sharpFocus = 0.5;
  // A change between consecutive frames above this (px) is flagged as a jump.
  double jumpPx = 3.0;
  int referenceFrame = 0;  // which frame the Registrar's reference is
};

class DriftTracker {
 public:
  DriftTracker(Registrar& registrar, const TrackOptions& options = {});

  // Frames must come in increasing order (gaps allowed).
  void add(int frame, const cv::Mat& image);
  // The shift the next frame's search will be centred on (reference coordinates).
  cv::Point2d prediction() const { return prediction_; }
  // The current estimate for a frame already added, relative to the reference.
  cv::Point2d rawShift(size_t index) const { return raw_[index].shift; }
  DriftTrack finish() const;

 private:
  // A move from the prediction larger than a jump may have landed on a lattice alias
  // of the true shift; the previous frame decides (see the .cpp).
  Measurement resolveAlias(const cv::Mat& image, const Measurement& m) const;
  double agreement(const cv::Mat& now, const cv::Mat& before, cv::Point2d shift) const;

  Registrar& registrar_;
  TrackOptions options_;
  std::vector<int> frames_;
  std::vector<Measurement> raw_;
  std::vector<double> recentMatches_;
  cv::Point2d prediction_{0, 0};
  cv::Mat previous_;  // the last trusted frame
  cv::Point2d previousShift_{0, 0};
};

}  // namespace budledger::registration
