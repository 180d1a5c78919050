#pragma once
// Where a frame's static chip structure is, as weights in [0, 1] for the
// registration: the frame's structure features folded onto the lattice's
// unit cell (the median over all cells, which drops cells and debris that do
// not sit in every trap alike) and tiled back over the frame. Everything
// that is not periodic, and so does not follow the stage, gets weight 0.
#include <vector>

#include <opencv2/core.hpp>

#include "core/traps/lattice.h"

namespace budledger::traps {

// `frame` CV_8UC1/CV_16UC1; returns CV_32F of the frame's size.
cv::Mat structureMap(const cv::Mat& frame, const Lattice& lattice);

// How persistent each pixel's structure is over a movie, from the structure
// features of a few registered frames spread over it (same region, CV_32F):
// from the ratio of a low quantile (20%) of each pixel's values to their
// median, mapped to [0, 1] (0 below one half, 1 from 0.9) and eroded by 2 px.
// Posts, there in every frame, score 1; the rims of cells that grow, bud and
// leave, and their blurred surroundings, score 0, even where cells sit in
// most traps and so survive the lattice average.
cv::Mat persistence(const std::vector<cv::Mat>& features);

// The lattice average itself: the median over the lattice cells of `fold`
// (default: the whole image) of CV_32F `values`, tiled over every pixel.
cv::Mat periodicAverage(const cv::Mat& values, const Lattice& lattice, cv::Rect fold = {});

}  // namespace budledger::traps
