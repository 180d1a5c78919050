#include "core/stats/restricted_mean.h"

#include <algorithm>
#include <cmath>

namespace budledger::stats {

using Real = long double;

RestrictedMean restrictedMean(const SurvivalCurve& curve, double horizon) {
  RestrictedMean out;
  out.horizon = horizon;
  // Steps inside the horizon, each with its Greenwood increment (0 where n = d).
  std::vector<Real> time, surv, increment;
  for (const auto& s : curve.steps) {
    if (s.time > horizon) break;
    time.push_back(s.time);
    surv.push_back(s.survival);
    increment.push_back(
        s.nRisk == s.nEvent ? 0.0L : Real(s.nEvent) / (Real(s.nRisk) * Real(s.nRisk - s.nEvent)));
  }
  // Rectangles: [0, t1) at height 1, then [t_j, t_{j+1}) at S_j, the last up to tau.
  const Real tau = horizon;
  Real area = (time.empty() ? tau : time.front()) * 1.0L;
  std::vector<Real> rect(time.size());
  for (std::size_t j = 0; j < time.size(); ++j) {
    Real right = j + 1 < time.size() ? time[j + 1] : tau;
    rect[j] = (right - time[j]) * surv[j];
    area += rect[j];
  }
  // A_j = area from t_j to tau, accumulated from the right.
  Real tail = 0.0L, var = 0.0L;
  for (std::size_t j = time.size(); j-- > 0;) {
    tail += rect[j];
    var += tail * tail * increment[j];
  }
  out.mean = double(area);
  out.stdErr = double(std::sqrt(var));
  return out;
}

double commonHorizon(const std::vector<SurvivalCurve>& curves) {
  double h = 0.0;
  for (const auto& c : curves) {
    if (auto t = c.lastTime()) h = std::max(h, double(*t));
  }
  return h;
}

}  // namespace budledger::stats
