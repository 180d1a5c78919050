#pragma once
// A synthetic brightfield trap array for tests, rendered analytically so that
// a sub-pixel shift of the stage is exact: dark posts forming cup-shaped traps
// on a lattice (optionally with staggered rows), cells that sit in cups or
// drift past, uneven illumination, noise, flicker and defocus. The truth
// (trap centres, drift) is known to the test that asks for it.
#include <cstdint>
#include <vector>

#include <opencv2/core.hpp>

namespace budledger::testing {

// A post wall segment from a to b with radius r, relative to the cup centre.
struct Capsule {
  cv::Point2d a, b;
  double radius;
};

struct SceneOptions {
  cv::Size size{640, 480};
  cv::Point2d latticeA{64, 0};  // along a row
  cv::Point2d latticeB{0, 72};  // to the next row (x != 0: staggered rows)
  cv::Point2d origin{40, 44};   // cup centre of one trap, frame-0 pixels
  std::vector<Capsule> trap = defaultCup();
  double background = 2400;        // grey level of the medium
  double postDepth = 1300;         // how much darker the posts are
  double edgeSoftness = 1.1;       // px
  double illuminationTilt = 0.15;  // relative brightness change across the frame
  double noiseSigma = 25;
  int cellsInTraps = 20;  // cells seated in cups (follow the stage)
  int freeCells = 6;      // cells drifting through (do not follow the stage)
  int dustSpots = 0;      // dark spots fixed to the camera (do not follow the stage)
  double cellRadius = 8;
  int bits = 16;
  std::uint64_t seed = 1;
  static std::vector<Capsule> defaultCup();
  static std::vector<Capsule> roundPostCup();  // a different geometry: three round posts
};

struct FrameEffects {
  cv::Point2d shift{0, 0};  // stage drift: frame-0 point p appears at p + shift
  double gain = 1.0;        // flicker
  double blurSigma = 0;     // defocus
  int time = 0;             // moves the free cells and grows the seated ones
};

class SyntheticScene {
 public:
  explicit SyntheticScene(const SceneOptions& options);
  const SceneOptions& options() const { return o_; }
  // Cup centres of every trap whose centre lies inside the frame at frame 0, row-major.
  std::vector<cv::Point2d> trapCentres() const;
  // Every trap centre near the frame, inside it or not.
  const std::vector<cv::Point2d>& allTrapCentres() const { return allCentres_; }
  cv::Mat render(const FrameEffects& effects) const;  // CV_16UC1 or CV_8UC1

 private:
  struct Cell {
    cv::Point2d offset;  // from its trap centre, or absolute for free cells
    int trap;            // -1: free
    cv::Point2d velocity;
    double radius;
  };
  SceneOptions o_;
  std::vector<cv::Point2d> allCentres_;  // incl. traps outside the frame (for cut traps)
  std::vector<Cell> cells_;
};

// A drift track for tests: smooth wander plus optional jumps at given frames.
std::vector<cv::Point2d> makeDrift(int frames, double amplitude, std::uint64_t seed,
                                   const std::vector<std::pair<int, cv::Point2d>>& jumps = {});

}  // namespace budledger::testing
