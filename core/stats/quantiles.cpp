#include "core/stats/quantiles.h"

#include <algorithm>
#include <cmath>
#include <set>
#include <utility>

namespace budledger::stats {
namespace {

// A step function given as knots x (ascending, starting at time 0) and the
// cumulative failure y = 1 − S at each knot; missing y are undefined band values.
struct FailureSteps {
  std::vector<double> x;
  std::vector<std::optional<double>> y;
};

// First position (0-based, in the order of `keys`) found by R's
// approx(keys, 1:n, p, method = "constant", f = 1): the index attached to the
// smallest key >= p, or none when p lies outside [min key, max key].
std::optional<std::size_t> constantRightLookup(
    const std::vector<std::pair<double, std::size_t>>& keys, double p) {
  if (keys.empty() || p < keys.front().first || p > keys.back().first) return std::nullopt;
  auto it = std::lower_bound(
      keys.begin(), keys.end(), p,
      [](const std::pair<double, std::size_t>& k, double v) { return k.first < v; });
  return it->second;
}

std::optional<double> findQuantile(const FailureSteps& in, double p, double tol) {
  // No defined value reaches p: not reached.
  bool any = false;
  double ymax = 0.0;
  for (const auto& v : in.y) {
    if (v) {
      ymax = any ? std::max(ymax, *v) : *v;
      any = true;
    }
  }
  if (!any || ymax < p) return std::nullopt;

  const double xmax = in.x.back();
  // Keep the first knot of each distinct y (R's duplicated(), where NA equals NA).
  std::vector<double> x;
  std::vector<std::optional<double>> y;
  std::set<double> seen;
  bool seenMissing = false;
  for (std::size_t i = 0; i < in.y.size(); ++i) {
    bool fresh = in.y[i] ? seen.insert(*in.y[i]).second : !std::exchange(seenMissing, true);
    if (fresh) {
      x.push_back(in.x[i]);
      y.push_back(in.y[i]);
    }
  }

  std::vector<std::pair<double, std::size_t>> up, down;
  for (std::size_t i = 0; i < y.size(); ++i) {
    if (!y[i]) continue;
    up.emplace_back(*y[i] + tol, i);
    down.emplace_back(*y[i] - tol, i);
  }
  std::sort(up.begin(), up.end());
  std::sort(down.begin(), down.end());
  auto i1 = constantRightLookup(up, p);
  auto i2 = constantRightLookup(down, p);
  std::optional<double> q;
  if (i1 && i2) q = (x[*i1] + x[*i2]) / 2.0;
  if (p == 0.0) q = x.front();
  // A curve or band that ends exactly at p: midpoint to the last follow-up time.
  if (y.back() && std::fabs(p - *y.back()) < tol) {
    q = i1 ? std::optional<double>((x[*i1] + xmax) / 2.0) : std::nullopt;
  }
  return q;
}

FailureSteps failureSteps(const SurvivalCurve& curve, int which) {
  FailureSteps f;
  f.x.reserve(curve.steps.size() + 1);
  f.y.reserve(curve.steps.size() + 1);
  f.x.push_back(0.0);
  f.y.push_back(0.0);
  for (const auto& s : curve.steps) {
    f.x.push_back(s.time);
    const std::optional<double>& v = which == 0   ? std::optional<double>(s.survival)
                                     : which == 1 ? s.lower
                                                  : s.upper;
    f.y.push_back(v ? std::optional<double>(1.0 - *v) : std::nullopt);
  }
  return f;
}

}  // namespace

std::vector<QuantileEstimate> quantiles(const SurvivalCurve& curve, std::span<const double> probs) {
  std::vector<QuantileEstimate> out;
  out.reserve(probs.size());
  const FailureSteps est = failureSteps(curve, 0);
  const FailureSteps lo = failureSteps(curve, 1);
  const FailureSteps hi = failureSteps(curve, 2);
  for (double p : probs) {
    QuantileEstimate q;
    q.probability = p;
    if (p >= 0.0 && p <= 1.0) {
      q.time = findQuantile(est, p, kQuantileTolerance);
      q.lower = findQuantile(lo, p, kQuantileTolerance);
      q.upper = findQuantile(hi, p, kQuantileTolerance);
    }
    out.push_back(q);
  }
  return out;
}

QuantileEstimate median(const SurvivalCurve& curve) {
  const double half[] = {0.5};
  return quantiles(curve, half).front();
}

}  // namespace budledger::stats
