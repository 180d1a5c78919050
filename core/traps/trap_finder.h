#pragma once
// Finds every trap of a position on a projection of its movie (the temporal
// median of registered frames, in frame-0 coordinates), knowing only the
// lattice: nothing about the trap's shape is assumed.
//  1. The lattice average: the median, over all lattice sites, of a box two
//     cells wide around each site. Cells differ between traps, the chip
//     does not, so what remains is the trap; pixels whose values disagree
//     between sites (cells) are not taken for structure.
//  2. The structure of that template (pixels far from the medium's level) is
//     split into parts; parts that repeat by a lattice vector are the same
//     part of different traps, and one of each, as close together as
//     possible, makes up one trap.
//  3. The cup centre is the middle of the free space deep inside the convex
//     hull of the trap's parts (where the largest discs fit between them):
//     where a cell sits, whatever the shape of the posts.
//  4. Every site is matched against the template (normalised correlation,
//     a few pixels of search), the lattice is refitted to the matches by
//     least squares, and sites that do not look like the template (outside
//     the array, a defect) are dropped.
#include <optional>
#include <string>

#include <opencv2/core.hpp>

#include "core/traps/lattice.h"
#include "core/traps/trap_layout.h"

namespace budledger::traps {

struct TrapFinderOptions {
  int searchPx = 3;  // template-matching search around each predicted site
  double presenceFraction =
      0.5;                  // a site is a trap if it matches at least this share of the median
  double minMatch = 0.3;    // ... and at least this well in absolute terms
  double minVisible = 0.4;  // share of a cut trap's support that must be in the frame
};

struct TrapFinding {
  TrapLayout layout;
  double fitResidualPx = 0;  // RMS distance of matched sites from the refitted lattice
  int sitesRejected = 0;     // lattice sites in the frame that did not look like a trap
  std::string note;          // why nothing was found, when nothing was
};

// `projection` CV_32F (or 8/16-bit) in frame-0 coordinates. The layout is
// empty (with a note) when no trap could be made out.
TrapFinding findTraps(const cv::Mat& projection, const Lattice& lattice,
                      const TrapFinderOptions& options = {});

}  // namespace budledger::traps
