#pragma once
// Reads the simulator's ground truth (DIR/truth/<position>/traps.csv and
// drift.csv) and scores an analysis against it: trap recall and precision by
// one-to-one matching of centres, the constant offset between our cup centre
// and the simulator's seat, and how far each trap's tracked position strays
// from the truth over the movie once that offset is removed.
#include <filesystem>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "core/register/drift.h"
#include "core/traps/trap_layout.h"

namespace budledger::testing {

struct TruthTrap {
  int id, row, col;
  cv::Point2d centre;
};

std::vector<TruthTrap> readTruthTraps(const std::filesystem::path& file);
std::vector<cv::Point2d> readTruthDrift(const std::filesystem::path& file);

struct LayoutScore {
  int truth = 0, found = 0, matched = 0;
  double recall = 0, precision = 0;
  cv::Point2d offset;           // mean (ours - truth) over matched traps
  double maxOffsetSpread = 0;   // max |ours - truth - offset| at frame 0
  double maxTrackError = 0;     // max over traps and trusted frames of the tracked position's error
  double maxTrackErrorAll = 0;  // the same over every frame, trusted or not
  double maxDriftError = 0;     // max |drift - true drift| over frames
  double rmsDriftError = 0;
  bool idsRowMajor = true;  // matched traps keep the truth's row-major order
};

// `tolerance`: largest centre distance (px) that counts as the same trap;
// frames whose drift confidence is below `trusted` count only in
// maxTrackErrorAll (the engine is told not to rely on them).
LayoutScore scoreLayout(const traps::TrapLayout& layout, const registration::DriftTrack& drift,
                        const std::vector<TruthTrap>& truth,
                        const std::vector<cv::Point2d>& truthDrift, double tolerance,
                        double trusted = 0.5);

}  // namespace budledger::testing
