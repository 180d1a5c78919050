#pragma once
// Device: the trap lattice of one field of view. Each trap is a cup of posts
// whose inlet faces upstream and whose narrow outlet faces downstream; the flow
// pushes a mother onto the two outlet lips, where she rests. Geometry is kept
// in a trap-local frame in µm: u across the flow, v along it (downstream
// positive), origin midway between the outlet lips. Image coordinates are
// device pixels = frame-0 pixels (the stage has not drifted at frame 0).
// Invariant: traps are numbered 0.. in row-major order and do not overlap.
#include <vector>

#include "demo/geometry.h"
#include "demo/rng.h"
#include "demo/scenario.h"

namespace budledger::demo {

struct Trap {
  int id = 0;
  int row = 0;
  int col = 0;
  Vec2 originPx;  // outlet midpoint, device pixels
  Vec2 seatPx;    // centre of a seated young mother, device pixels (traps.csv x,y)
};

class Device {
 public:
  // `referenceRadiusUm`: radius of a young mother, which fixes the seat.
  Device(const DeviceParams& params, double referenceRadiusUm, Rng rng);

  int width() const { return width_; }
  int height() const { return height_; }
  const std::vector<Trap>& traps() const { return traps_; }
  const DeviceParams& params() const { return p_; }
  double pxPerUm() const { return 1.0 / p_.pixelUm; }

  Vec2 downstream() const { return down_; }  // unit vector in image coordinates
  Vec2 across() const { return across_; }

  // Image position (device px) of trap-local point (u, v) in µm.
  Vec2 toImage(const Trap& t, double uUm, double vUm) const;
  // Local v (µm) of the centre of a mother of radius r resting on the lips.
  double seatV(double radiusUm) const;
  // Signed distance (µm) from trap-local (u, v) to the nearest post, < 0 inside.
  double postDistance(double uUm, double vUm) const;
  // Local box (µm) that holds every post of a trap.
  double extentU() const;
  double extentVUp() const;    // upstream extent (positive number)
  double extentVDown() const;  // downstream extent

  // Optical thickness of the posts (0..1 = full channel height of PDMS) on a
  // canvas whose pixel (0, 0) is device pixel (-offset, -offset).
  void renderPosts(std::vector<float>& canvas, int canvasWidth, int canvasHeight, int offset) const;

 private:
  double arcDistance(double u, double v) const;
  double pillarDistance(double u, double v) const;
  double blockDistance(double u, double v) const;

  DeviceParams p_;
  int width_ = 0;
  int height_ = 0;
  Vec2 down_{0.0, 1.0};
  Vec2 across_{1.0, 0.0};
  std::vector<Trap> traps_;
  // Arc geometry: inner circle through the lips and the inlet tips.
  double arcCentreV_ = 0.0;
  double arcRadius_ = 0.0;
  std::vector<Vec2> pillars_;  // pillar centres (u >= 0 half; mirrored)
  double pillarRadius_ = 0.0;
};

}  // namespace budledger::demo
