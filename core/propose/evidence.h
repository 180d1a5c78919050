#pragma once
// FrameEvidence: what the measure stage tells the temporal model about one
// trap in one frame. Every field is optional evidence: an uninformative frame
// (defocus, failed registration) carries none, and NaN fields are skipped, so
// a missing reading never reads as "no cell".
#include <array>
#include <cmath>
#include <limits>
#include <vector>

namespace budledger::propose {

inline constexpr double kMissing = std::numeric_limits<double>::quiet_NaN();

// Occupancy classes in the order of core/base Occupancy.
enum OccupancyClass { kEmpty = 0, kSingle = 1, kBudded = 2, kCrowded = 3 };

struct FrameEvidence {
  bool informative = true;
  // Classifier posteriors P(empty, single, budded, crowded | crop); sum to 1.
  std::array<double, 4> occupancy{0.25, 0.25, 0.25, 0.25};
  // Area of the bud attached to the mother over the mother's area; NaN when
  // no bud was found (then only `occupancy` speaks about buds).
  double budRatio = kMissing;
  // Area other cells left near the mother since the previous informative frame, over
  // her area (a departing daughter); NaN when unknown.
  double departure = kMissing;
  // P(the mother looks dead | crop) from morphology; NaN when unknown.
  double deadLook = kMissing;
  // The mother's morphology (e.g. contrast, texture, log area), compared by the temporal
  // model with her own live baseline to see the gradual change after death; NaN when no
  // mother was measured.
  std::array<double, 3> morph{kMissing, kMissing, kMissing};
};

inline constexpr int kMorphCount = 3;
inline constexpr int kMorphLogArea = 2;  // morph[kMorphLogArea]: log of her area in pixels

using TrapEvidence = std::vector<FrameEvidence>;  // one per frame

inline bool isKnown(double v) { return std::isfinite(v); }

}  // namespace budledger::propose
