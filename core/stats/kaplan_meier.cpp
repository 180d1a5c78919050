#include "core/stats/kaplan_meier.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/stats/distributions.h"

namespace budledger::stats {

using Real = long double;

void confidenceInterval(const KaplanMeierOptions& options, double z, SurvivalStep& step) {
  // Double precision suffices here (R works in double too); the products and
  // sums the interval is built from are accumulated in long double.
  const double s = step.survival;
  step.lower.reset();
  step.upper.reset();
  if (!(s > 0.0) || std::isinf(step.varLogSurvival)) return;
  const double se = std::sqrt(step.varLogSurvival);  // SE of log S
  switch (options.transform) {
    case ConfidenceTransform::Log:
      step.lower = std::exp(std::log(s) - z * se);
      step.upper = std::min(std::exp(std::log(s) + z * se), 1.0);
      break;
    case ConfidenceTransform::LogLog: {
      if (s == 1.0) return;
      const double ls = std::log(s);
      const double w = z * se / ls;
      step.lower = std::exp(-std::exp(std::log(-ls) - w));
      step.upper = std::exp(-std::exp(std::log(-ls) + w));
      break;
    }
    case ConfidenceTransform::Plain: {
      const double half = z * se * s;
      step.lower = std::max(s - half, 0.0);
      step.upper = std::min(s + half, 1.0);
      break;
    }
  }
}

SurvivalCurve kaplanMeier(const Tally& tally, const KaplanMeierOptions& options,
                          std::string group) {
  SurvivalCurve curve;
  curve.group = std::move(group);
  curve.options = options;
  curve.n = tallySize(tally);
  curve.events = tallyEvents(tally);
  curve.steps.reserve(tally.size());
  const double z = twoSidedZ(options.confidenceLevel);
  long atRisk = curve.n;
  Real survival = 1.0L, greenwood = 0.0L;
  for (const auto& c : tally) {
    SurvivalStep step;
    step.time = c.time;
    step.nRisk = atRisk;
    step.nEvent = c.events;
    step.nCensor = c.censored;
    if (c.events > 0) {
      const Real n = Real(atRisk), d = Real(c.events);
      survival *= (n - d) / n;
      greenwood = (atRisk == c.events) ? std::numeric_limits<Real>::infinity()
                                       : greenwood + d / (n * (n - d));
    }
    step.survival = double(survival);
    step.varLogSurvival = double(greenwood);
    if (survival > 0.0L) step.stdErr = double(survival * std::sqrt(greenwood));
    confidenceInterval(options, z, step);
    curve.steps.push_back(step);
    atRisk -= c.total();
  }
  return curve;
}

std::vector<SurvivalCurve> kaplanMeierByGroup(const Cohort& cohort,
                                              const KaplanMeierOptions& options) {
  std::vector<SurvivalCurve> curves;
  curves.reserve(cohort.groups().size());
  for (std::size_t g = 0; g < cohort.groups().size(); ++g) {
    curves.push_back(kaplanMeier(cohort.groupTally(g), options, cohort.groups()[g]));
  }
  return curves;
}

double SurvivalCurve::survivalAt(double t) const {
  auto it = std::upper_bound(steps.begin(), steps.end(), t,
                             [](double v, const SurvivalStep& s) { return v < s.time; });
  return it == steps.begin() ? 1.0 : std::prev(it)->survival;
}

long SurvivalCurve::atRisk(double t) const {
  auto it = std::lower_bound(steps.begin(), steps.end(), t,
                             [](const SurvivalStep& s, double v) { return s.time < v; });
  return it == steps.end() ? 0 : it->nRisk;
}

std::vector<CensorMark> SurvivalCurve::censorMarks() const {
  std::vector<CensorMark> marks;
  for (const auto& s : steps) {
    if (s.nCensor > 0) marks.push_back({s.time, s.survival, s.nCensor});
  }
  return marks;
}

std::optional<int> SurvivalCurve::lastTime() const {
  if (steps.empty()) return std::nullopt;
  return steps.back().time;
}

std::vector<AtRiskEntry> numberAtRisk(const SurvivalCurve& curve, std::span<const int> times) {
  std::vector<AtRiskEntry> out;
  out.reserve(times.size());
  for (int t : times) out.push_back({t, curve.atRisk(t)});
  return out;
}

}  // namespace budledger::stats
