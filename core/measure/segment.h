#pragma once
// segmentCrop: cells in one trap crop against that trap's empty background.
// The difference to the background is smoothed and thresholded in units of
// the position's noise SD, with the sign of the cells' outline chosen per
// position (cells may be darker or brighter than the medium, with or without a
// halo of the other sign); holes are filled
// so a ring-shaped rim becomes a solid cell; touching cells are split by a
// watershed on the distance transform (Beucher & Meyer 1993) seeded at its
// peaks, merging peaks with no neck between them.
//
// Invariants: every returned cell has area >= the minimum; at most one cell
// is the mother and at most one the bud; the bud touches the mother.
#include <opencv2/core.hpp>

#include <vector>

#include "core/measure/cells.h"

namespace budledger::measure {

struct CropGeometry {
  double cupX = 0, cupY = 0;  // where a seated mother's centre lies, crop pixels
  double pixelUm = 0.27;
};

struct SegmentParams {
  // Sign of the cell outline against the medium: -1 dark rim, +1 bright rim, 0 either
  // (absolute difference). Set per position by estimatePolarity(), so that a halo of
  // the opposite sign is not taken for part of the cell.
  int polarity = 0;
  double threshold = 3.5;  // noise SDs of the smoothed difference
  double smoothSigmaPx = 1.0;
  double motherRadiusPx = 9;          // expected; refined per position from the cells themselves
  double minCellAreaFraction = 0.03;  // of the expected mother area
  double minBudAreaFraction = 0.025;  // a bud still joined to the mother, same unit
  double seatRadiusFactor = 1.0;      // mother centre within this many radii of the cup
  double minMotherAreaFraction = 0.25;
  double neckRatio = 0.75;  // peaks joined by a ridge this high (of the lower peak) are one cell
  bool keepMask = false;    // fill CropReading::mask (for departures between frames)
};

// `crop` and `background` are the same size (CV_32F); `noiseSd` is the SD of the
// smoothed difference in empty regions (see estimateNoise). `noiseMap`, when given,
// is that SD per pixel (noiseMap()), and replaces `noiseSd`.
CropReading segmentCrop(const cv::Mat& crop, const cv::Mat& background, double noiseSd,
                        const CropGeometry& geometry, const SegmentParams& params,
                        const cv::Mat* noiseMap = nullptr);

// Where the background has strong edges (the posts), a registration error of a
// fraction of a pixel leaves a residual of about that error times the edge's
// gradient, which must not pass for a cell: the per-pixel SD is the camera noise
// combined with that term, sqrt(noise^2 + (shift * |grad background|)^2).
cv::Mat noiseMap(const cv::Mat& background, double noiseSd, double shiftPx, double smoothSigmaPx);

// The typical misregistration (px) that explains residuals at the background's edges
// in crops known to be empty: least squares of residual^2 - noise^2 on |grad|^2.
double estimateShift(const std::vector<const cv::Mat*>& emptyCrops,
                     const std::vector<const cv::Mat*>& backgrounds, double noiseSd,
                     double smoothSigmaPx);

// Filled outline areas of a crop under each sign, and their overlap.
struct OutlineAreas {
  double dark = 0, bright = 0, both = 0;
  OutlineAreas& operator+=(const OutlineAreas& o) {
    dark += o.dark;
    bright += o.bright;
    both += o.both;
    return *this;
  }
};
OutlineAreas outlineAreas(const cv::Mat& crop, const cv::Mat& background, double noiseSd,
                          const SegmentParams& params);

// Chooses the outline polarity from areas summed over sample crops. A halo of the
// opposite sign encloses the cell, so its filled outline contains the cell's: the
// sign whose filled area lies inside the other's is the cell body. When one sign
// finds almost nothing, the cells show in the other alone.
int choosePolarity(const OutlineAreas& areas);

// Robust SD of the smoothed difference (MAD x 1.4826), cells being a minority of pixels.
double estimateNoise(const cv::Mat& crop, const cv::Mat& background, double smoothSigmaPx);

}  // namespace budledger::measure
