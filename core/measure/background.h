#pragma once
// BackgroundModel: what each trap looks like empty, learned from the data
// itself. Empty traps are the one kind of crop that looks the same in every
// trap and at every time (cells differ in size, age, bud and pose), so among
// sample crops of all traps the empty ones are those with close neighbours in
// other traps: each sample's distance to its k-th nearest sample from another
// trap is small for empties; the empty mode is split off by Otsu's threshold
// and checked against the camera's noise floor (measured in the crops' borders
// between consecutive samples). A trap with enough empty samples of
// its own gets their median; the others get the median of all empty samples
// (registered crops of identical traps line up), carried onto each such trap by
// the sub-pixel shift that fits it best: a found lattice is regular, fabricated
// traps are not quite.
//
// Crops are compared after dividing by their own medium level, so lamp
// flicker and uneven illumination do not count as structure.
//
// Invariants: every background has the crop size and is on the normalised
// scale of normaliseCrop(); when no sample looks empty the model says so
// (quality() == NoEmptyTrap) and falls back to the lattice median of all
// samples rather than pretending.
#include <opencv2/core.hpp>
#include <vector>

namespace budledger::measure {

struct BackgroundOptions {
  double cupRadiusPx = 10;   // disk around the cup centre where a mother would sit
  int minOwnEmpty = 3;       // own empty samples needed for a trap's own background
  int neighbours = 3;        // k of the k-nearest-neighbour distance
  double noiseFactor = 3.0;  // the empty mode must lie within this x the noise floor
  int threads = 0;           // 0: all hardware threads
};

class BackgroundModel {
 public:
  enum class Source { Own, Lattice, Fallback };
  enum class Quality { Good, NoEmptyTrap };

  // samples[i] are normalised crops (normaliseCrop) of trap i at sampled frames, in time
  // order; cupX/cupY the cup centre in crop pixels.
  static BackgroundModel learn(const std::vector<std::vector<cv::Mat>>& samples, double cupX,
                               double cupY, const BackgroundOptions& options);

  const cv::Mat& background(std::size_t trap) const { return backgrounds_.at(trap); }
  Source source(std::size_t trap) const { return sources_.at(trap); }
  Quality quality() const { return quality_; }
  int emptySamples() const { return emptySamples_; }
  double noiseFloor() const { return floor_; }
  // Samples judged empty, per trap (indexes into that trap's sample list).
  const std::vector<std::vector<int>>& empties() const { return empties_; }
  // Shift (px) by which the lattice background was carried onto the trap; zero for
  // traps with their own background.
  cv::Point2d offset(std::size_t trap) const { return offsets_.at(trap); }

 private:
  friend class BackgroundSearch;  // builds the model (background_search.h)
  std::vector<cv::Mat> backgrounds_;
  std::vector<Source> sources_;
  std::vector<std::vector<int>> empties_;
  std::vector<cv::Point2d> offsets_;
  Quality quality_ = Quality::Good;
  int emptySamples_ = 0;
  double floor_ = 0;
};

// A crop divided by its medium level (the median of a 3-pixel border), as CV_32F.
cv::Mat normaliseCrop(const cv::Mat& crop);

// Per-pixel median of equally sized CV_32F images.
cv::Mat pixelMedian(const std::vector<const cv::Mat*>& images);

}  // namespace budledger::measure
