// Facts of the trade as sanity checks on simulated populations — not exact
// values. A wild-type-like population (laboratory strains in 2% glucose: mean
// RLS ≈ 26 divisions, Huberts et al. 2014, PNAS 111:11727) should show a
// median near 25; division intervals near 90 minutes early in life (doubling
// ≈ 90 min in rich medium, Sherman 2002, Methods Enzymol 350:3–41), lengthening
// over the last divisions before death (reported widely, e.g. Fehrmann et al.
// 2013, Cell Rep 5:1589). The populations are drawn here from a fixed seed.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "core/stats/stats.h"

namespace budledger::stats {
namespace {

// Gompertz lifespans by inversion, hazard b·e^{a t}: with a = 0.15 and
// b = 0.0025 the continuous median is ln(1 + a ln2 / b)/a ≈ 25 divisions.
std::vector<Lifespan> wildTypeLike(int n, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  const double a = 0.15, b = 0.0025;
  std::vector<Lifespan> out;
  for (int i = 0; i < n; ++i) {
    const double t = std::log(1.0 - a * std::log(1.0 - u(rng)) / b) / a;
    Lifespan l{int(std::round(t)), true, "wt", {}};
    if (u(rng) < 0.15) {  // washed out alive at a random earlier age
      l.event = false;
      l.divisions = int(l.divisions * u(rng));
    }
    out.push_back(l);
  }
  return out;
}

TEST(Sanity, WildTypeLikeMedianNearTwentyFive) {
  const Cohort c(wildTypeLike(2000, 5));
  const auto curve = kaplanMeier(c.groupTally(0));
  const auto m = median(curve);
  ASSERT_TRUE(m.time);
  EXPECT_NEAR(*m.time, 25.0, 2.0);
  EXPECT_LT(*m.upper - *m.lower, 3.0);  // 2,000 mothers pin the median down
  const auto fit = fitGompertz(c.groupTally(0));
  ASSERT_TRUE(fit.estimable);
  EXPECT_NEAR(fit.rate, 0.15, 0.03);
  EXPECT_NEAR(*fit.doublingTime, std::log(2.0) / 0.15, 1.0);
}

TEST(Sanity, DivisionIntervalsNinetyMinutesEarlyAndLongerBeforeDeath) {
  // Frames every 5 minutes; intervals of about 18 frames (90 min) that grow over
  // the last five divisions before death.
  std::mt19937 rng(9);
  std::normal_distribution<double> jitter(0.0, 1.5);
  std::vector<MotherDivisions> mothers;
  for (int m = 0; m < 300; ++m) {
    const int divisions = 15 + m % 20;
    MotherDivisions md{{}, true, "wt"};
    int frame = 3;
    md.separationFrames.push_back(frame);
    for (int k = 1; k < divisions; ++k) {
      const int fromDeath = divisions - k;
      const double mean = 18.0 + (fromDeath <= 5 ? 4.0 * (6 - fromDeath) : 0.0);
      frame += std::max(8, int(std::lround(mean + jitter(rng))));
      md.separationFrames.push_back(frame);
    }
    mothers.push_back(std::move(md));
  }
  const auto p = divisionIntervalProfiles(mothers, {5.0}).front();
  EXPECT_NEAR(p.byAge[0].median, 90.0, 10.0);
  EXPECT_GT(p.beforeDeath[0].median, 1.2 * p.beforeDeath[8].median);
  EXPECT_NEAR(p.beforeDeath[8].median, 90.0, 10.0);
}

}  // namespace
}  // namespace budledger::stats
