#pragma once
// Quantiles of a Kaplan–Meier curve — the median RLS above all — with
// confidence intervals by inverting the pointwise band (Brookmeyer & Crowley
// 1982): the interval for the time at which S falls to 1 − p runs from where
// the lower band falls to 1 − p to where the upper band does.
//
// Conventions (the same as R survival 3.5-3 quantile.survfit):
//  - The p-quantile is the smallest time at which 1 − S >= p.
//  - Where 1 − S equals p exactly (within sqrt(machine epsilon)) on a flat
//    stretch, the quantile is the midpoint between the start of that stretch
//    and the next death time (deaths at 1..10 → median 5.5); when the flat
//    stretch is the end of the curve, the midpoint to the last follow-up time.
//  - The same rules apply to each band, so an end can be "not reached"
//    (an empty optional) while the estimate exists.
#include <optional>
#include <span>
#include <vector>

#include "core/stats/kaplan_meier.h"

namespace budledger::stats {

struct QuantileEstimate {
  double probability = 0.5;    // p: the quantile is where survival falls to 1 − p
  std::optional<double> time;  // none: not reached
  std::optional<double> lower;
  std::optional<double> upper;
};

// Quantiles for failure probabilities p in [0, 1] (0.5 = median), with intervals
// from the curve's own band (its KaplanMeierOptions).
std::vector<QuantileEstimate> quantiles(const SurvivalCurve& curve, std::span<const double> probs);
QuantileEstimate median(const SurvivalCurve& curve);

// The tolerance R uses to call a survival value equal to 1 − p.
inline constexpr double kQuantileTolerance = 1.4901161193847656e-08;  // sqrt(2^-52)

}  // namespace budledger::stats
