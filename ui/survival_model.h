#pragma once
// SurvivalModel: the experiment's Kaplan–Meier curves per group, kept live.
// It holds every mother's lifespan (divisions; died or censored; the group of
// her position) in a stats::Cohort and, when the session says a trap changed,
// swaps that trap's lifespans out and in (O(groups + distinct times), not a
// re-read of the experiment), then recomputes curves, medians and the
// log-rank comparison and says so — synchronously, so a repaint scheduled by
// the same edit already shows the new curves.
#include <QObject>
#include <QString>
#include <unordered_map>
#include <vector>

#include "core/stats/cohort.h"
#include "core/stats/kaplan_meier.h"
#include "ui/review_session.h"
#include "ui/survival_curve.h"

namespace budledger::ui {

class SurvivalModel : public QObject {
  Q_OBJECT

 public:
  explicit SurvivalModel(QObject* parent = nullptr);
  void setSession(ReviewSession* session);

  const std::vector<SurvivalCurve>& curves() const { return curves_; }
  // One line comparing the groups ("log-rank χ² 4.12, 1 df, p = 0.042"), or
  // why there is no comparison.
  const QString& comparison() const { return comparison_; }
  long mothers() const { return cohort_.size(); }

  // Plain conversion of core's step data to the plot's (first step at 0).
  static SurvivalCurve fromStats(const stats::SurvivalCurve& curve);

 signals:
  void changed();

 private:
  void onTrapChanged(TrapId trap);
  std::vector<stats::Lifespan> lifespansOf(TrapId trap) const;
  void recompute();

  ReviewSession* session_ = nullptr;
  std::unordered_map<TrapId, std::vector<stats::Lifespan>> byTrap_;
  stats::Cohort cohort_;
  std::vector<SurvivalCurve> curves_;
  QString comparison_;
};

}  // namespace budledger::ui
