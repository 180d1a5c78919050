#pragma once
// TrapLayout: the traps of one position in frame-0 pixels. Invariants: traps
// are in row-major order (rows top to bottom, left to right within a row)
// and `id` equals the index, starting at 0; ids stay fixed for the position
// once stored, so every later record (measurements, events, journal) can
// refer to a trap by id. `crop` is the box, relative to a trap's centre, that
// measurement and thumbnails look at.
#include <optional>
#include <vector>

#include <opencv2/core.hpp>

#include "core/traps/lattice.h"

namespace budledger::traps {

struct Trap {
  int id = 0;
  int row = 0;
  int col = 0;
  cv::Point2d centre;  // cup centre, frame-0 pixels
  bool edge = false;   // cut by the image edge at some frame
  double match = 1;    // how well the site matches the lattice-average trap (1 for supplied)
};

struct TrapLayout {
  enum class Source { Detected, Supplied };
  Source source = Source::Detected;
  std::vector<Trap> traps;
  std::optional<Lattice> lattice;
  cv::Rect2d support;  // extent of one trap's structure, relative to its centre
  cv::Rect crop;       // crop box relative to the centre (integer pixels)
  cv::Mat templ;       // lattice-average image of one trap over `crop` (CV_32F), may be empty
};

// Orders traps row-major and assigns id, row and col. Rows follow the
// lattice's index along b when a lattice is given, else rows are clusters of
// similar y (closer than half the typical vertical spacing).
void numberTraps(std::vector<Trap>& traps, const std::optional<Lattice>& lattice);

// Flags traps whose support box, moved by any drift within [minDrift,
// maxDrift], leaves the frame.
void flagEdges(TrapLayout& layout, cv::Size frame, cv::Point2d minDrift, cv::Point2d maxDrift);

// A crop box for traps on `lattice` with the given support: the support
// grown to the lattice cell around it, so buds and daughters stay in view.
cv::Rect cropBox(const cv::Rect2d& support, const std::optional<Lattice>& lattice);

}  // namespace budledger::traps
