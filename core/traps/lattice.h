#pragma once
// Lattice: the repeating arrangement of traps on the chip, as two basis
// vectors and an origin (a point of the lattice, in frame-0 pixels). Found
// from the autocorrelation of structure features, which does not depend on
// where the stage has drifted to, so frames need not be registered first.
// Invariant of a found lattice: `a` is the most horizontal of the shortest
// basis (a.x > 0), `b` points down (b.y > 0) and is reduced against `a`
// (|b . a| <= |a|^2 / 2), so rows of traps run along `a`; staggered rows show
// as b.x != 0.
#include <optional>
#include <vector>

#include <opencv2/core.hpp>

namespace budledger::traps {

struct Lattice {
  cv::Point2d a, b;
  cv::Point2d origin{0, 0};
  double quality = 0;  // mean normalised autocorrelation at +-a, +-b, in (0, 1]

  cv::Point2d at(double i, double j) const { return origin + i * a + j * b; }
  // Lattice coordinates (fractional i, j) of an image point.
  cv::Point2d indices(cv::Point2d p) const;
  double minPitch() const;
};

struct LatticeOptions {
  int analysisSize = 384;       // frames are reduced so their longer side is at most this
  double minPitchPx = 10;       // shortest lattice vector accepted (full-resolution px)
  double strongFraction = 0.5;  // a peak is a lattice candidate above this share of the best
};

// From one or more frames of one position (not necessarily registered).
// nullopt when no convincing two-dimensional lattice is present.
std::optional<Lattice> findLattice(const std::vector<cv::Mat>& frames,
                                   const LatticeOptions& options = {});

// Fits origin, a and b by least squares to points known to sit at integer
// lattice indices (i, j), weighted; returns the refitted lattice.
Lattice fitLattice(const std::vector<cv::Point2d>& points, const std::vector<cv::Point>& indices,
                   const std::vector<double>& weights);

}  // namespace budledger::traps
