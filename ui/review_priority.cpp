#include "ui/review_priority.h"

#include <QCoreApplication>
#include <algorithm>
#include <cmath>

namespace budledger::ui {

namespace {

QString t(const char* s) { return QCoreApplication::translate("ReviewPriority", s); }

bool near(int a, int b, int within) { return std::abs(a - b) <= within; }

}  // namespace

std::vector<ReviewItem> reviewItems(const TrapReviewInput& in, const PriorityOptions& o) {
  std::vector<ReviewItem> out;
  if (!in.events) return out;

  // Frames where the engine saw crowding, or registration was doubtful.
  std::vector<int> crowded, unregistered;
  if (in.measurements)
    for (const auto& m : *in.measurements)
      if (m.occupancy == Occupancy::Crowded) crowded.push_back(m.frame);
  if (in.drift) {
    for (size_t i = 0; i < in.drift->size(); ++i) {
      const auto& d = (*in.drift)[i];
      bool bad = d.confidence < o.minDriftConfidence;
      if (i > 0) {
        const auto& prev = (*in.drift)[i - 1];
        bad = bad || std::hypot(d.dx - prev.dx, d.dy - prev.dy) > o.maxDriftJumpPx;
      }
      if (bad) unregistered.push_back(d.frame);
    }
  }
  auto anyNear = [&](const std::vector<int>& frames, int f) {
    return std::any_of(frames.begin(), frames.end(),
                       [&](int x) { return near(x, f, o.nearFrames); });
  };

  // Previous counted separation and whether a bud came since, walking in frame order.
  std::optional<int> lastSeparation;
  bool budSince = false;
  for (const auto& e : *in.events) {
    if (!e.counts()) continue;
    const int f = e.event.frame;
    ReviewItem item{in.trap, e.event.id, f, e.event.kind, 0, 0, {}};
    QStringList why;
    if (e.event.kind == EventKind::Arrival) {
      lastSeparation.reset();
      budSince = false;
    }
    if (e.event.kind == EventKind::Separation) {
      if (lastSeparation && in.intervalMinutes) {
        const double minutes = (f - *lastSeparation) * *in.intervalMinutes;
        if (minutes < o.minIntervalMinutes) {
          item.need += 0.6;
          item.reasons |= kShortInterval;
          why << t("only %1 min after the previous division").arg(std::lround(minutes));
        } else if (minutes > o.maxIntervalMinutes) {
          item.need += 0.3;
          item.reasons |= kLongInterval;
          why << t("%1 h since the previous division").arg(minutes / 60.0, 0, 'f', 1);
        }
      }
      if (!budSince) {
        item.need += 0.4;
        item.reasons |= kUnpaired;
        why << t("no bud before this separation");
      }
      lastSeparation = f;
      budSince = false;
    }
    if (e.event.kind == EventKind::Bud) budSince = true;
    if (e.decision != Decision::Proposed) continue;  // decided: nothing to queue
    if (e.event.confidence < o.confident) {
      item.need += 1.0 - e.event.confidence;
      item.reasons |= kLowConfidence;
      why.prepend(t("confidence %1%").arg(std::lround(e.event.confidence * 100)));
    }
    if (anyNear(crowded, f)) {
      item.need += 0.5;
      item.reasons |= kCrowding;
      why << t("trap crowded nearby");
    }
    if (anyNear(unregistered, f)) {
      item.need += 0.5;
      item.reasons |= kRegistration;
      why << t("registration doubtful nearby");
    }
    if (item.need <= o.showAbove) continue;
    item.why = why.join(QStringLiteral("; "));
    out.push_back(std::move(item));
  }
  sortByNeed(out);
  return out;
}

bool comesBefore(const ReviewItem& a, const ReviewItem& b) {
  if (a.need != b.need) return a.need > b.need;
  if (a.trap != b.trap) return a.trap < b.trap;
  return a.frame < b.frame;
}

void sortByNeed(std::vector<ReviewItem>& items) {
  std::stable_sort(items.begin(), items.end(), comesBefore);
}

}  // namespace budledger::ui
