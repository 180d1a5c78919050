#pragma once
// Scene: what is in front of the objective at one frame, as a list of cell
// bodies to draw (mothers, buds, daughters, stuck and passing cells) in camera
// pixels. Built from the trap lives (biology.h) and the stage drift; holds no
// pixels. Random choices that vary per frame (wobble, passing cells) come from
// streams keyed by (trap, frame), so a frame's scene does not depend on which
// frames were built before it.
#include <cstdint>
#include <vector>

#include "demo/biology.h"
#include "demo/device.h"
#include "demo/geometry.h"
#include "demo/rng.h"

namespace budledger::demo {

struct CellBody {
  Vec2 centre;           // camera pixels
  double semiMajor = 0;  // px, along `axis`
  double semiMinor = 0;  // px
  Vec2 axis{1.0, 0.0};   // unit vector of the major axis
  double thickness = 0;  // µm at the centre
  double absorb = 0;     // fraction of light absorbed at the centre
  double granules = 0;   // texture strength (dead cells are granular)
  double vacuole = 0;    // depth of the vacuole dip, fraction of thickness
  double spin = 0;       // texture orientation, radians
  std::uint64_t seed = 0;
};

class SceneBuilder {
 public:
  SceneBuilder(const Device& device, const std::vector<TrapLife>& lives, const BiologyParams& bio,
               double intervalMin, Rng rng);
  // Appends the bodies of frame `frame`, whose stage shift is `drift` (px).
  void build(int frame, Vec2 drift, std::vector<CellBody>& out) const;

 private:
  void addTrap(const Trap& trap, const TrapLife& life, int frame, double t, Vec2 drift,
               std::vector<CellBody>& out) const;
  void addDrifters(int frame, Vec2 drift, std::vector<CellBody>& out) const;
  CellBody body(const Trap& trap, Vec2 drift, double u, double v, double radiusUm) const;

  const Device& device_;
  const std::vector<TrapLife>& lives_;
  BiologyParams bio_;
  double interval_;
  Rng rng_;
  double maxRadiusUm_;
};

}  // namespace budledger::demo
