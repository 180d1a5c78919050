#pragma once
// BackgroundSearch: the empty-trap search of BackgroundModel, split so that
// the cup disk can be tried at several places for the price of one
// smoothing. Smoothing every sample and the camera's noise floor (measured
// in the crop borders) do not depend on where the disk lies; only the k-NN
// distances and the empty/occupied split do, and those are cheap. The
// backgrounds themselves (pixel medians, sub-pixel fits) are built once, for
// the disk that is kept.
//
// Invariants: empties(x, y) followed by model() gives exactly what
// BackgroundModel::learn(samples, x, y, options) gives; `samples` must
// outlive the search.
#include <opencv2/core.hpp>
#include <vector>

#include "core/measure/background.h"

namespace budledger::measure {

class BackgroundSearch {
 public:
  // Empty samples needed for a lattice background; with fewer the model is NoEmptyTrap.
  static constexpr int kMinEmpty = 3;

  // samples[i]: normalised crops of trap i at the sampled frames, in time order.
  BackgroundSearch(const std::vector<std::vector<cv::Mat>>& samples,
                   const BackgroundOptions& options);

  // Samples judged empty (indexes into each trap's samples) with the cup disk
  // centred at (cupX, cupY), crop pixels.
  // radiusPx > 0 replaces the options' cup radius.
  std::vector<std::vector<int>> empties(double cupX, double cupY, double radiusPx = 0) const;
  // The backgrounds that follow from a choice of empty samples.
  BackgroundModel model(std::vector<std::vector<int>> empties) const;

  double noiseFloor() const { return floor_; }

 private:
  const std::vector<std::vector<cv::Mat>>& samples_;
  BackgroundOptions options_;
  cv::Size size_;
  std::vector<std::vector<cv::Mat>> smoothed_;  // [trap][sample], as samples_
  double floor_ = 0;
};

// How many samples a choice of empties holds.
int countSamples(const std::vector<std::vector<int>>& empties);

}  // namespace budledger::measure
