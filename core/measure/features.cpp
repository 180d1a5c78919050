#include "core/measure/features.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

namespace budledger::measure {
namespace {

double radiusOf(double areaPx) { return std::sqrt(std::max(0.0, areaPx) / std::numbers::pi); }

// Edge-to-edge gap between two cells modelled as disks of their areas.
double gapBetween(const Cell& a, const Cell& b) {
  return std::hypot(a.x - b.x, a.y - b.y) - radiusOf(a.areaPx) - radiusOf(b.areaPx);
}

}  // namespace

std::string_view featureName(int i) {
  static constexpr std::string_view names[kFeatureCount] = {
      "mother",          "mother_area",   "bud_ratio",       "attached_cells",
      "neighbour_gap",   "neighbour_area", "cup_strength",   "foreground_area",
      "mother_elongation", "mother_offset"};
  return i >= 0 && i < kFeatureCount ? names[i] : "?";
}

FrameFeatures computeFeatures(const CropReading& r, const FeatureContext& ctx) {
  FrameFeatures f;
  const double expectedArea = std::numbers::pi * ctx.motherRadiusPx * ctx.motherRadiusPx;
  f.x[6] = std::log1p(std::max(0.0, r.cupStrength));
  f.x[7] = r.foregroundPx / expectedArea;
  f.x[4] = 3.0;  // no neighbour: far
  if (r.mother < 0) {
    f.motherContrast = f.motherTexture = f.motherAreaPx = std::numeric_limits<double>::quiet_NaN();
    return f;
  }
  const Cell& m = r.cells[static_cast<std::size_t>(r.mother)];
  const double rm = radiusOf(m.areaPx);
  f.hasMother = true;
  f.x[0] = 1;
  f.x[1] = m.areaPx / expectedArea;
  f.x[8] = m.eccentricity;
  f.x[9] = std::hypot(m.cupDxUm, m.cupDyUm) /
           std::max(1e-9, rm * std::sqrt(m.areaUm2 / std::max(1e-9, m.areaPx)));
  f.motherContrast = m.contrast;
  f.motherTexture = m.texture;
  f.motherAreaPx = m.areaPx;
  double bestBud = 0, nearestGap = 3.0, nearestArea = 0;
  int attached = 0;
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    if (static_cast<int>(i) == r.mother) continue;
    const Cell& c = r.cells[i];
    const double gap = gapBetween(m, c) / std::max(1.0, rm);
    const bool isAttached = (static_cast<int>(i) == r.bud && c.touchesMother &&
                             gap < ctx.attachGap) ||
                            gap < ctx.attachGap;
    if (isAttached && c.areaPx < m.areaPx) {
      ++attached;
      bestBud = std::max(bestBud, c.areaPx / m.areaPx);
    } else if (gap < 1.0) {
      ++f.nearOthers;
    }
    if (!isAttached && gap < nearestGap) {
      nearestGap = std::max(0.0, gap);
      nearestArea = c.areaPx / m.areaPx;
    }
  }
  f.budRatio = bestBud;
  f.x[2] = bestBud;
  f.x[3] = attached;
  f.x[4] = nearestGap;
  f.x[5] = nearestArea;
  return f;
}

}  // namespace budledger::measure
