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

// R's findq() split in two: the curve-dependent part once, then one lookup per p.
struct PreparedSteps {
  bool any = false;
  double ymax = 0.0, xmax = 0.0;
  std::vector<double> x;  // first knot of each distinct y
  std::vector<std::optional<double>> y;
  std::vector<std::pair<double, std::size_t>> up, down;  // (y ± tol, knot), sorted
};

PreparedSteps prepare(const FailureSteps& in, double tol) {
  PreparedSteps s;
  for (const auto& v : in.y) {
    if (v) {
      s.ymax = s.any ? std::max(s.ymax, *v) : *v;
      s.any = true;
    }
  }
  if (!s.any) return s;
  s.xmax = in.x.back();
  // Keep the first knot of each distinct y (R's duplicated(), where NA equals NA).
  std::set<double> seen;
  bool seenMissing = false;
  for (std::size_t i = 0; i < in.y.size(); ++i) {
    const bool fresh = in.y[i] ? seen.insert(*in.y[i]).second : !std::exchange(seenMissing, true);
    if (fresh) {
      s.x.push_back(in.x[i]);
      s.y.push_back(in.y[i]);
    }
  }
  for (std::size_t i = 0; i < s.y.size(); ++i) {
    if (!s.y[i]) continue;
    s.up.emplace_back(*s.y[i] + tol, i);
    s.down.emplace_back(*s.y[i] - tol, i);
  }
  std::sort(s.up.begin(), s.up.end());
  std::sort(s.down.begin(), s.down.end());
  return s;
}

std::optional<double> findQuantile(const PreparedSteps& s, double p, double tol) {
  // No defined value reaches p: not reached.
  if (!s.any || s.ymax < p) return std::nullopt;
  const auto i1 = constantRightLookup(s.up, p);
  const auto i2 = constantRightLookup(s.down, p);
  std::optional<double> q;
  if (i1 && i2) q = (s.x[*i1] + s.x[*i2]) / 2.0;
  if (p == 0.0) q = s.x.front();
  // A curve or band that ends exactly at p: midpoint to the last follow-up time.
  if (s.y.back() && std::fabs(p - *s.y.back()) < tol) {
    q = i1 ? std::optional<double>((s.x[*i1] + s.xmax) / 2.0) : std::nullopt;
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
  const double tol = kQuantileTolerance;
  const PreparedSteps est = prepare(failureSteps(curve, 0), tol);
  const PreparedSteps lo = prepare(failureSteps(curve, 1), tol);
  const PreparedSteps hi = prepare(failureSteps(curve, 2), tol);
  for (double p : probs) {
    QuantileEstimate q;
    q.probability = p;
    if (p >= 0.0 && p <= 1.0) {
      q.time = findQuantile(est, p, tol);
      q.lower = findQuantile(lo, p, tol);
      q.upper = findQuantile(hi, p, tol);
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
