#pragma once
// Registrar: measures one frame's translation against a fixed reference
// frame. Two stages: a coarse phase correlation over a large reduced window
// whose search is bounded to a disc around a prediction (on a lattice of
// traps an unbounded peak search can lock onto a shift of one whole trap
// pitch), then a Gauss-Newton refinement on a patch, first at half and then
// at full resolution, for sub-pixel precision. The refinement is weighted by
// an optional structure map (the chip's posts, which follow the stage) so
// that cells, debris and fixed camera patterns, which do not, pull the
// estimate as little as possible. The coarse stage is not weighted: a
// weighted, purely periodic reference would make every lattice alias match
// equally well, and the non-periodic rest of the chip is what tells them apart. Holds reusable
// buffers: one Registrar per thread.
#include <array>
#include <map>

#include <opencv2/core.hpp>

#include "core/register/phase_correlation.h"
#include "core/register/refine.h"

namespace budledger::registration {

struct RegistrationOptions {
  int coarseWindow = 512;   // side of the full-resolution region the coarse stage sees
  int coarseSize = 128;     // which is reduced to at most this many pixels per side
  int finePatch = 192;      // side of the full-resolution patch of the fine stage
  double searchRadius = 0;  // bound on |shift - prediction| in px; 0 = a quarter of the window
  double maxShift = 0;      // bound on |shift| in px; 0 = 45% of the frame's smaller side
  double jumpRatio = 1.6;   // a peak outside the search disc must be this much higher to win
  // The chip's lattice vectors, when known: a far peak one lattice vector
  // (or a few) from the near one is an alias of it, never a jump.
  cv::Point2d latticeA{0, 0}, latticeB{0, 0};
  int refineIterations = 4;  // Gauss-Newton iterations per resolution (most frames need two)
  bool robust = true;        // reweight the full-resolution refinement by residual
};

struct Measurement {
  cv::Point2d shift;       // frame(x + shift) ~ reference(x)
  double coarsePeak = 0;   // phase-correlation peak of the coarse stage
  double correlation = 0;  // weighted correlation of the aligned patches after refinement
  double focus = 0;        // normalised gradient energy of the frame's fine patch
  bool jump = false;       // the coarse peak was taken outside the search disc
  bool refined = false;    // the Gauss-Newton refinement converged
};

class Registrar {
 public:
  // `reference` CV_8UC1/CV_16UC1; `structure` CV_32F of the same size in
  // [0, 1] (or empty): where the static structure is.
  Registrar(const cv::Mat& reference, const cv::Mat& structure, const RegistrationOptions& options);

  Measurement measure(const cv::Mat& frame, cv::Point2d prediction);
  // The refinement alone, from an estimate good to about a pixel (a second
  // look with better structure weights); `shift` stays within 1.5 px of it.
  Measurement refineOnly(const cv::Mat& frame, cv::Point2d estimate);
  // Replaces the structure weights of the refinement.
  void setStructure(const cv::Mat& structure);
  const RegistrationOptions& options() const { return options_; }
  double searchRadius() const { return searchRadius_; }

 private:
  struct FinePatch {
    cv::Rect rect;  // in reference coordinates
    TranslationRefiner half, full;
  };
  FinePatch* finePatchFor(cv::Point shift);  // nullptr when the shift leaves no room
  bool isAlias(cv::Point2d offset) const;
  void refine(const cv::Mat& frame, cv::Point2d start, double reach, Measurement& m);

  RegistrationOptions options_;
  cv::Size frameSize_;
  cv::Rect coarseRect_;  // full-resolution window of the coarse stage (reference coordinates)
  int factor_ = 1;       // reduction of the coarse stage
  double searchRadius_ = 0, maxShift_ = 0;
  PhaseCorrelator coarse_{0.35, 0.03, 0.5f};
  cv::Mat refFrame_, structure_;                  // full resolution
  std::map<std::array<int, 4>, FinePatch> fine_;  // by patch origin and size
  cv::Mat small_, smallFeatures_, halfRegion_, halfFeatures_, fullFeatures_;
};

}  // namespace budledger::registration
