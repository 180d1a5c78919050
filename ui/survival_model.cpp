#include "ui/survival_model.h"

#include "core/stats/kaplan_meier.h"
#include "core/stats/log_rank.h"
#include "core/stats/quantiles.h"

namespace budledger::ui {

SurvivalModel::SurvivalModel(QObject* parent) : QObject(parent) {}

void SurvivalModel::setSession(ReviewSession* session) {
  if (session_) disconnect(session_, nullptr, this, nullptr);
  session_ = session;
  byTrap_.clear();
  std::vector<stats::Lifespan> all;
  if (session_) {
    for (const TrapId t : session_->allTraps()) {
      auto list = lifespansOf(t);
      all.insert(all.end(), list.begin(), list.end());
      byTrap_[t] = std::move(list);
    }
    connect(session_, &ReviewSession::trapChanged, this, &SurvivalModel::onTrapChanged);
  }
  cohort_ = stats::Cohort(all);
  recompute();
}

std::vector<stats::Lifespan> SurvivalModel::lifespansOf(TrapId trap) const {
  std::vector<stats::Lifespan> out;
  const auto* pos = session_->position(trap.position);
  const std::string group = pos ? pos->group : std::string();
  for (const auto& t : session_->tenures(trap))
    out.push_back({t.divisions, t.outcome == Outcome::Death, group, {}});
  return out;
}

void SurvivalModel::onTrapChanged(TrapId trap) {
  auto& old = byTrap_[trap];
  for (const auto& l : old) cohort_.remove(l);
  old = lifespansOf(trap);
  for (const auto& l : old) cohort_.add(l);
  recompute();
}

SurvivalCurve SurvivalModel::fromStats(const stats::SurvivalCurve& c) {
  SurvivalCurve out;
  out.label = QString::fromStdString(c.group);
  out.subjects = static_cast<int>(c.n);
  out.events = static_cast<int>(c.events);
  out.steps.push_back({0, 1, 1, 1});
  for (const auto& s : c.steps) {
    if (s.nEvent == 0) continue;  // censorings alone do not move the curve
    // An undefined end (at S = 0) draws as the curve itself, not as a guess.
    out.steps.push_back({static_cast<double>(s.time), s.survival, s.lower.value_or(s.survival),
                         s.upper.value_or(s.survival)});
  }
  for (const auto& m : c.censorMarks())
    out.censored.push_back({static_cast<double>(m.time), m.survival, static_cast<int>(m.count)});
  out.lastX = c.lastTime().value_or(0);
  const stats::QuantileEstimate med = stats::median(c);
  out.median = med.time;
  out.medianLower = med.lower;
  out.medianUpper = med.upper;
  return out;
}

void SurvivalModel::recompute() {
  curves_.clear();
  comparison_.clear();
  if (cohort_.empty()) {
    emit changed();
    return;
  }
  for (const auto& c : stats::kaplanMeierByGroup(cohort_)) curves_.push_back(fromStats(c));
  if (cohort_.groups().size() >= 2) {
    const stats::LogRankResult lr = stats::logRank(cohort_);
    // p first: in a narrow panel the end of the line is what gets elided.
    comparison_ = lr.defined ? tr("log-rank p = %1 (χ² %2, %3 df)")
                                   .arg(lr.pValue, 0, 'g', 3)
                                   .arg(lr.chiSquare, 0, 'f', 2)
                                   .arg(lr.df)
                             : tr("no log-rank test: %1").arg(QString::fromStdString(lr.problem));
  } else {
    comparison_ = tr("one group: nothing to compare");
  }
  emit changed();
}

}  // namespace budledger::ui
