#pragma once
// Where a frame's static chip structure is, as weights in [0, 1] for the
// registration: the frame's structure features folded onto the lattice's
// unit cell (the median over all cells, which drops cells and debris that do
// not sit in every trap alike) and tiled back over the frame. Everything
// that is not periodic, and so does not follow the stage, gets weight 0.
#include <opencv2/core.hpp>

#include "core/traps/lattice.h"

namespace budledger::traps {

// `frame` CV_8UC1/CV_16UC1; returns CV_32F of the frame's size.
cv::Mat structureMap(const cv::Mat& frame, const Lattice& lattice);

// The lattice average itself: the median over the lattice cells of `fold`
// (default: the whole image) of CV_32F `values`, tiled over every pixel.
cv::Mat periodicAverage(const cv::Mat& values, const Lattice& lattice, cv::Rect fold = {});

}  // namespace budledger::traps
