#pragma once
// Cells found in one trap crop and the roles they play. A crop is a trap's
// registered window of one frame; coordinates are crop pixels, sizes also in
// micrometres. The mother is the cell seated in the cup; a bud is a cell that
// touches the mother and is smaller than her; every other cell is a daughter
// or passer-by ("other").
#include <opencv2/core.hpp>
#include <vector>

namespace budledger::measure {

enum class CellRole { Mother, Bud, Other };

struct Cell {
  double x = 0, y = 0;  // centroid, crop pixels
  double areaPx = 0;
  double areaUm2 = 0;
  double diameterUm = 0;            // equivalent-area circle
  double eccentricity = 0;          // 0 circle .. 1 line, from second moments
  double cupDxUm = 0, cupDyUm = 0;  // centroid relative to the cup centre
  double contrast = 0;              // mean signed difference from background, in noise SDs
  double strength = 0;              // mean absolute difference from background, in noise SDs
  double texture = 0;               // SD of the difference inside the cell, in noise SDs
  // Pixels of background between this cell's outline and the mother's (the nearest
  // pair); 0 for the mother and a bud joined to her, -1 when no mother was found. A
  // bud squeezed into a gap is long and thin, so disks of equal area would put it
  // farther away than it is.
  double gapToMotherPx = -1;
  bool touchesMother = false;
  bool cutByEdge = false;
  CellRole role = CellRole::Other;
};

// One crop's reading. `mother` / `bud` index `cells`, -1 when absent.
struct CropReading {
  std::vector<Cell> cells;
  // When asked for (SegmentParams::keepMask): CV_16U, cell index + 1 per pixel, 0 for
  // background; and the smoothed difference to the background in noise SDs, times the
  // outline sign (CV_32F).
  cv::Mat mask;
  cv::Mat difference;
  int mother = -1;
  int bud = -1;
  double foregroundPx = 0;
  double cupStrength = 0;  // mean |difference| in the cup disk, noise SDs (segmentation-free)
  double budRatio() const {
    return mother >= 0 && bud >= 0 ? cells[static_cast<std::size_t>(bud)].areaPx /
                                         cells[static_cast<std::size_t>(mother)].areaPx
                                   : 0.0;
  }
  int attachedCount() const {
    int n = 0;
    for (const auto& c : cells) n += c.touchesMother && c.role != CellRole::Mother;
    return n;
  }
  int otherCount() const {
    int n = 0;
    for (const auto& c : cells) n += c.role == CellRole::Other;
    return n;
  }
};

}  // namespace budledger::measure
