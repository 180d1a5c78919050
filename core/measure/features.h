#pragma once
// FrameFeatures: a crop reading reduced to numbers that mean the same under
// any optics and pixel size — sizes relative to the position's expected
// mother, distances relative to the mother's radius, contrasts in noise
// units. They feed the occupancy classifier; the mother's morphology
// (contrast, texture, area) feeds the temporal model's death evidence.
#include <array>
#include <string_view>

#include "core/measure/cells.h"

namespace budledger::measure {

struct FeatureContext {
  double motherRadiusPx = 9;  // expected for the position
  double attachGap = 0.35;    // a neighbour closer than this x the mother's radius is attached
};

inline constexpr int kFeatureCount = 10;
using FeatureVector = std::array<double, kFeatureCount>;
std::string_view featureName(int i);

struct FrameFeatures {
  FeatureVector x{};
  // Attached bud (a touching, smaller cell) over mother area; 0 when none.
  double budRatio = 0;
  bool hasMother = false;
  int nearOthers = 0;  // cells other than mother and bud within one mother radius of her
  // Mother's morphology for the death evidence (NaN when no mother).
  double motherContrast = 0, motherTexture = 0, motherAreaPx = 0;
};

// Also settles which touching cell is the mother's bud (gap-based attachment).
FrameFeatures computeFeatures(const CropReading& reading, const FeatureContext& context);

}  // namespace budledger::measure
