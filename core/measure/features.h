#pragma once
// FrameFeatures: a crop reading reduced to numbers that mean the same under
// any optics and pixel size — sizes relative to the position's expected
// mother, distances relative to the mother's radius, contrasts in noise
// units. They feed the occupancy classifier; the mother's morphology
// (contrast, texture, area) feeds the temporal model's death evidence.
#include <array>
#include <string_view>
#include <vector>

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
  // Attached cells (smaller than the mother, within the attach gap of her outline) over
  // her area, summed: a bud broken into pieces by the segmentation is still one bud.
  // 0 when none.
  double budRatio = 0;
  bool lodgedNeighbour = false;  // a lodged cell beside the mother may hide her bud
  bool hasMother = false;
  int nearOthers = 0;  // cells other than mother and bud within one mother radius of her
  // Mother's morphology for the death evidence (NaN when no mother).
  double motherContrast = 0, motherTexture = 0, motherAreaPx = 0;
};

// Cells closer to the mother than the attach gap and smaller than her: bud candidates.
struct AttachedCell {
  int cell = 0;           // index in CropReading::cells
  double dx = 0, dy = 0;  // centre relative to the mother's, in mother radii
  double areaRatio = 0;   // over the mother's area
};
std::vector<AttachedCell> attachedCells(const CropReading& reading, const FeatureContext& context);

// Per frame of one trap, the cells beside the mother that are not buds: a neighbour that
// stays beside her, at the same place and without growing, for longer than a bud ever
// takes (a lodged daughter, a stuck cell). Buds grow and then leave. `minFrames` is that
// duration in readings of the neighbour; she may be read a little apart from the mother,
// or not at all, for a frame or two meanwhile.
std::vector<std::vector<int>> lodgedNeighbours(const std::vector<CropReading>& readings,
                                               const FeatureContext& context, int minFrames);

// Area that cells attached to the mother in `before` covered and no cell covers in
// `now`, over the mother's area: a daughter carried away as she separates. Cells that
// were already apart (a daughter drifting off) do not count. Needs keepMask readings;
// `attachedBefore` are the bud candidates of `before` (lodged ones excluded).
// A pixel has gone when it shows less than `backgroundSd` noise SDs of difference of
// the outline's sign now (so a bud merely missed by the segmentation has not gone, and
// a neighbour's halo of the other sign does not hide that it has).
double departedArea(const CropReading& before, const std::vector<int>& attachedBefore,
                    const CropReading& now, double backgroundSd);

// Features of one reading; `excluded` cells (lodged neighbours) are not buds and count
// as crowding.
FrameFeatures computeFeatures(const CropReading& reading, const FeatureContext& context,
                              const std::vector<int>& excluded = {});

}  // namespace budledger::measure
