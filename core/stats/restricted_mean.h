#pragma once
// Restricted mean lifespan: the area under the Kaplan–Meier curve from 0 to a
// horizon tau, with its standard error Σ_j A_j² d_j/(n_j(n_j − d_j)), where A_j
// is the area from death time j to tau (the Greenwood-type estimate used by R
// survival 3.5-3 print.survfit; a step where everyone dies adds nothing).
// Beyond the last follow-up the curve is carried flat to tau.
#include <vector>

#include "core/stats/kaplan_meier.h"

namespace budledger::stats {

struct RestrictedMean {
  double horizon = 0.0;  // tau
  double mean = 0.0;
  double stdErr = 0.0;
};

RestrictedMean restrictedMean(const SurvivalCurve& curve, double horizon);

// The horizon R calls "common": the largest follow-up time over all curves
// (0 when there is none), so that groups are compared over the same range.
double commonHorizon(const std::vector<SurvivalCurve>& curves);

}  // namespace budledger::stats
