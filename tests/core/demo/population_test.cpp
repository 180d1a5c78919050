// Over a large simulated population the statistics come out as configured:
// the Kaplan–Meier median RLS and the mean early division interval.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <map>

#include "sim_fixtures.h"

namespace budledger::demo {
namespace {

struct KmMedian {
  double median = NAN, lower = NAN, upper = NAN;  // NAN: not reached
};

// Kaplan–Meier over divisions with Greenwood variance and the log(−log) 95%
// band; the median's interval is where the band crosses 1/2 (Brookmeyer &
// Crowley 1982, as R survival's survfit reports it). A small local version:
// the project's statistics library is checked against R on its own.
KmMedian kaplanMeierMedian(const std::vector<std::pair<int, bool>>& data) {
  std::map<int, std::pair<int, int>> at;  // time -> (deaths, censored)
  for (const auto& [t, died] : data) (died ? at[t].first : at[t].second)++;
  int atRisk = static_cast<int>(data.size());
  double s = 1.0, greenwood = 0.0;
  KmMedian out;
  for (const auto& [t, dc] : at) {
    const int d = dc.first;
    if (d > 0) {
      s *= 1.0 - static_cast<double>(d) / atRisk;
      if (atRisk > d)
        greenwood += static_cast<double>(d) / (static_cast<double>(atRisk) * (atRisk - d));
      double lo = 0.0, hi = 0.0;
      if (s > 0.0 && s < 1.0) {
        const double se = std::sqrt(greenwood) / std::fabs(std::log(s));
        lo = std::pow(s, std::exp(1.959964 * se));
        hi = std::pow(s, std::exp(-1.959964 * se));
      }
      if (std::isnan(out.median) && s <= 0.5) out.median = t;
      if (std::isnan(out.lower) && lo <= 0.5) out.lower = t;
      if (std::isnan(out.upper) && hi <= 0.5) out.upper = t;
    }
    atRisk -= dc.first + dc.second;
  }
  return out;
}

// Many traps, a long movie, ordinary washout: independent right-censoring.
Scenario population(double median, double shape, std::uint64_t seed) {
  Scenario s;
  s.seed = seed;
  s.frames = 900;  // 150 h, long enough for nearly every mother to die
  s.device.rows = 30;
  s.device.cols = 30;
  s.biology.medianRls = median;
  s.biology.gompertzShape = shape;
  s.biology.washoutPerHour = 0.006;
  s.biology.arrivalPerHour = 0.0;
  s.groups.push_back(GroupSpec{"pop", 2, s.biology});
  return s;
}

std::vector<std::pair<int, bool>> lifespans(const Scenario& s) {
  std::vector<std::pair<int, bool>> out;
  for (const auto& spec : positionsOf(s))
    for (const auto& t : modelPosition(s, spec).truth.tenures) out.push_back({t.divisions, t.died});
  return out;
}

TEST(Population, KaplanMeierMedianMatchesTheConfiguredMedian) {
  for (const auto& [median, shape] : {std::pair{25.0, 0.12}, std::pair{32.0, 0.10}}) {
    const auto data = lifespans(population(median, shape, 5));
    ASSERT_GT(data.size(), 1500u);
    const auto km = kaplanMeierMedian(data);
    SCOPED_TRACE(::testing::Message() << "configured " << median << ", KM median " << km.median
                                      << " [" << km.lower << ", " << km.upper << "]");
    ASSERT_FALSE(std::isnan(km.upper));
    EXPECT_LE(km.lower, median);
    EXPECT_GE(km.upper, median);
    const auto censored =
        std::count_if(data.begin(), data.end(), [](auto& d) { return !d.second; });
    EXPECT_GT(censored, 50);  // the test exercises censoring
  }
}

TEST(Population, MeanEarlyIntervalMatchesTheConfiguredCycle) {
  Scenario s = population(25.0, 0.12, 9);
  s.frames = 400;
  s.biology.ageSlowdown = 0.0;  // early intervals are then cycle_min on average
  s.groups[0].biology = s.biology;
  s.groups[0].positions = 1;
  const auto spec = positionsOf(s)[0];
  const PositionModel m = modelPosition(s, spec);
  std::map<std::pair<int, int>, std::vector<int>> seps;
  for (const auto& e : m.truth.events)
    if (e.kind == EventKind::Separation) seps[{e.trap, e.mother}].push_back(e.frame);
  std::map<std::pair<int, int>, int> divisionsIfDead;
  for (const auto& t : m.truth.tenures)
    if (t.died) divisionsIfDead[{t.trap, t.mother}] = t.divisions;
  // Intervals between separations 1..8 of mothers that lived well beyond them,
  // far from the slowdown before death.
  double sum = 0;
  int n = 0;
  for (const auto& [key, frames] : seps) {
    auto it = divisionsIfDead.find(key);
    const int lifespan = it == divisionsIfDead.end() ? 1000 : it->second;
    for (std::size_t k = 1; k < frames.size() && k <= 8; ++k) {
      if (static_cast<int>(k) + 1 + s.biology.lateDivisions >= lifespan) break;
      sum += (frames[k] - frames[k - 1]) * s.intervalMin;
      ++n;
    }
  }
  ASSERT_GT(n, 3000);
  const double mean = sum / n;
  // Standard error: cv·mean/√n, plus frame quantisation (≤ interval/√(6n)); 4 SE.
  const double se = (s.biology.cycleCv * s.biology.cycleMin + s.intervalMin) / std::sqrt(n);
  EXPECT_NEAR(mean, s.biology.cycleMin, 4 * se) << "n=" << n;
}

TEST(Population, IntervalsLengthenBeforeDeath) {
  const Scenario s = population(25.0, 0.12, 13);
  const auto spec = positionsOf(s)[0];
  const PositionModel m = modelPosition(s, spec);
  std::map<std::pair<int, int>, std::vector<int>> seps;
  for (const auto& e : m.truth.events)
    if (e.kind == EventKind::Separation) seps[{e.trap, e.mother}].push_back(e.frame);
  double early = 0, late = 0;
  int ne = 0, nl = 0;
  for (const auto& t : m.truth.tenures) {
    if (!t.died || t.divisions < 12) continue;
    const auto& f = seps[{t.trap, t.mother}];
    for (std::size_t k = 1; k < 6; ++k, ++ne) early += f[k] - f[k - 1];
    late += f.back() - f[f.size() - 2];
    ++nl;
  }
  ASSERT_GT(nl, 100);
  // Configured: the last interval is (1 + late_slowdown) = 2.5× a young one (Fehrmann et al. 2013
  // report lengthening over the last divisions); allow for age slowdown and noise.
  EXPECT_GT((late / nl) / (early / ne), 1.8);
}

}  // namespace
}  // namespace budledger::demo
