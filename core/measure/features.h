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
// or not at all, for a frame or two meanwhile. A bud of a daughter's size that moves
// out from the mother without shrinking has let go of her, and is a neighbour from then
// on, however briefly she stays.
std::vector<std::vector<int>> lodgedNeighbours(const std::vector<CropReading>& readings,
                                               const FeatureContext& context, int minFrames);

// Area that cells attached to the mother in `before` covered and that now is no part of
// her body, over the mother's area: a daughter carried away as she separates, or one
// that separated and stays beside her, read apart from her or lodged (she then covers
// those pixels as a cell of her own; they count only if `next`, the following reading,
// does not join them to the mother again). Cells that were already apart (a daughter
// drifting off) do not count. Needs keepMask readings; `attached…` are the bud
// candidates of each reading (lodged ones excluded).
// A pixel nothing covers now has gone when it shows less than `backgroundSd` noise SDs
// of difference of the outline's sign (so a bud merely missed by the segmentation has
// not gone, and a neighbour's halo of the other sign does not hide that it has).
double departedArea(const CropReading& before, const std::vector<int>& attachedBefore,
                    const CropReading& now, const std::vector<int>& attachedNow,
                    double backgroundSd, const CropReading* next = nullptr,
                    const std::vector<int>& attachedNext = {});

// Cells attached to the mother, smaller than `maxAreaRatio` of her, whose pixels lie
// within 2 px of one of `neighbours`: the seam where a neighbour presses against her,
// not a bud. Needs a keepMask reading (none without).
std::vector<int> seamsAgainst(const CropReading& reading, const FeatureContext& context,
                              const std::vector<int>& neighbours, double maxAreaRatio);

// Cells of a daughter's size read apart from the mother (not attached): a daughter
// leaving, or a neighbour. A small piece attached to the mother and touching one is a
// seam against her (seamsAgainst), such as her part still in an outlet gap.
std::vector<int> daughtersApart(const CropReading& reading, const FeatureContext& context);

// Features of one reading; `excluded` cells (lodged neighbours) are not buds and count
// as crowding.
FrameFeatures computeFeatures(const CropReading& reading, const FeatureContext& context,
                              const std::vector<int>& excluded = {});

}  // namespace budledger::measure
