#pragma once
// Review priority: which undecided calls most need a person, and why. Plain
// C++ over one trap's events, tenures, engine readings and registration, so
// it is tested without widgets and recomputed per trap after an edit.
//
// A call's need adds up from what makes it doubtful (weights are the
// workstation's own choice, tuned for ordering, not for meaning):
//   low confidence      1 - confidence, for calls below `confident`
//   implausible interval a separation less than `minIntervalMinutes` after the
//                       previous one in the tenure (+0.6), or more than
//                       `maxIntervalMinutes` (+0.3)
//   unpaired call       a separation with no bud since the previous one (+0.4)
//   crowding            the engine saw a crowded trap within `nearFrames` (+0.5)
//   registration        drift confidence under `minDriftConfidence`, or a jump
//                       over `maxDriftJumpPx`, within `nearFrames` (+0.5)
// Decided calls need nothing. Invariant: items come sorted by need, highest
// first, ties by trap then frame.
#include <QString>
#include <cstdint>
#include <optional>
#include <vector>

#include "core/lineage/lineage.h"
#include "core/store/project.h"
#include "ui/review_event.h"

namespace budledger::ui {

struct PriorityOptions {
  double confident = 0.9;
  // Young mothers divide about every 90 min in rich medium; under half that is
  // not a real division, and over 8 h is worth a look (common practice).
  double minIntervalMinutes = 45;
  double maxIntervalMinutes = 480;
  int nearFrames = 3;
  double minDriftConfidence = 0.5;
  double maxDriftJumpPx = 3.0;
  double showAbove = 0.05;  // needs at or below this are not listed
};

enum ReviewReason : unsigned {
  kLowConfidence = 1u << 0,
  kShortInterval = 1u << 1,
  kLongInterval = 1u << 2,
  kUnpaired = 1u << 3,
  kCrowding = 1u << 4,
  kRegistration = 1u << 5,
};

struct ReviewItem {
  TrapId trap;
  std::int64_t eventId = 0;
  int frame = 0;
  EventKind kind = EventKind::Bud;
  double need = 0;
  unsigned reasons = 0;
  QString why;  // one line naming the reasons, for the queue
};

struct TrapReviewInput {
  TrapId trap;
  const std::vector<ReviewEvent>* events = nullptr;
  const std::vector<lineage::Tenure>* tenures = nullptr;
  const std::vector<store::MeasurementRecord>* measurements = nullptr;
  const std::vector<store::DriftRecord>* drift = nullptr;
  std::optional<double> intervalMinutes;
};

std::vector<ReviewItem> reviewItems(const TrapReviewInput& in, const PriorityOptions& o = {});
// Queue order: need (highest first), then trap, then frame.
bool comesBefore(const ReviewItem& a, const ReviewItem& b);
void sortByNeed(std::vector<ReviewItem>& items);

}  // namespace budledger::ui
