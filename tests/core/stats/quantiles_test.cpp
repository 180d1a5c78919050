// Medians, quantiles and restricted means against published worked examples
// (data: Freireich et al. 1963 via Gehan 1965; Miller 1981). Expected values:
// R survival 3.5-3 (../shared/reference/survival-check-values.md) unless a
// line says otherwise.
#include <gtest/gtest.h>

#include <cmath>

#include "core/stats/quantiles.h"
#include "core/stats/restricted_mean.h"
#include "tests/core/stats/datasets.h"

namespace budledger::stats {
namespace {

using namespace testdata;

const KaplanMeierOptions kLogLog{0.95, ConfidenceTransform::LogLog};

TEST(Median, SixMpAndPlacebo) {
  const auto sixMp = median(kaplanMeier(tallyOf(kSixMp)));
  EXPECT_EQ(*sixMp.time, 23.0);
  EXPECT_EQ(*sixMp.lower, 16.0);
  EXPECT_FALSE(sixMp.upper);  // "not reached"
  const auto sixMpLL = median(kaplanMeier(tallyOf(kSixMp), kLogLog));
  EXPECT_EQ(*sixMpLL.lower, 13.0);
  EXPECT_FALSE(sixMpLL.upper);

  const auto placebo = median(kaplanMeier(tallyOf(kPlacebo)));
  EXPECT_EQ(*placebo.time, 8.0);
  EXPECT_EQ(*placebo.lower, 4.0);
  EXPECT_EQ(*placebo.upper, 12.0);
  const auto placeboLL = median(kaplanMeier(tallyOf(kPlacebo), kLogLog));
  EXPECT_EQ(*placeboLL.lower, 4.0);
  EXPECT_EQ(*placeboLL.upper, 11.0);
}

TEST(Median, Aml) {
  const auto m = median(kaplanMeier(tallyOf(kAmlMaintained)));
  EXPECT_EQ(*m.time, 31.0);
  EXPECT_EQ(*m.lower, 18.0);
  EXPECT_FALSE(m.upper);
  const auto n = median(kaplanMeier(tallyOf(kAmlNonmaintained)));
  EXPECT_EQ(*n.time, 23.0);
  EXPECT_EQ(*n.lower, 8.0);
  EXPECT_FALSE(n.upper);
  const auto nLL = median(kaplanMeier(tallyOf(kAmlNonmaintained), kLogLog));
  EXPECT_EQ(*nLL.lower, 5.0);
  EXPECT_EQ(*nLL.upper, 33.0);
}

TEST(Median, MidpointOnAnExactFlatAtOneHalf) {
  // Deaths at 1..10: S = 0.5 exactly on [5, 6), so the median is 5.5 (R survival
  // 3.5-3; integer lifespans make this case common).
  std::vector<Obs> obs;
  for (int t = 1; t <= 10; ++t) obs.push_back({t, true});
  const auto c = kaplanMeier(tallyOf(obs));
  EXPECT_EQ(*median(c).time, 5.5);
  // Quartiles: S = 0.75 is not hit exactly (0.8, 0.7), so the 25% quantile is 3;
  // S = 0.25 is not hit either (0.3, 0.2): 75% quantile is 8. The log band
  // gives 1 – 8 and 3 – not reached, 6 – not reached (R survival 3.5-3,
  // quantile(survfit(Surv(1:10, rep(1, 10)) ~ 1)), run live).
  const double p[] = {0.25, 0.5, 0.75};
  const auto q = quantiles(c, p);
  EXPECT_EQ(*q[0].time, 3.0);
  EXPECT_EQ(*q[2].time, 8.0);
  EXPECT_EQ(*q[0].lower, 1.0);
  EXPECT_EQ(*q[0].upper, 8.0);
  EXPECT_EQ(*q[1].lower, 3.0);
  EXPECT_FALSE(q[1].upper);
  EXPECT_EQ(*q[2].lower, 6.0);
  EXPECT_FALSE(q[2].upper);
}

TEST(Median, FlatAtOneHalfToTheEndUsesLastFollowUp) {
  // Two deaths of four then censorings: S = 0.5 from t = 2 to the last follow-up
  // at 9; R's rule takes the midpoint (2 + 9) / 2 (R survival 3.5-3 findq).
  const auto c = kaplanMeier(tallyOf({{1, true}, {2, true}, {5, false}, {9, false}}));
  EXPECT_EQ(*median(c).time, 5.5);
}

TEST(Median, NotReachedWhenEverythingIsCensored) {
  const auto c = kaplanMeier(tallyOf({{4, false}, {7, false}, {7, false}}));
  const auto m = median(c);
  EXPECT_FALSE(m.time);
  EXPECT_FALSE(m.lower);
  EXPECT_FALSE(m.upper);
  EXPECT_FALSE(median(kaplanMeier(Tally{})).time);
}

TEST(RestrictedMean, SixMpAndPlaceboToCommonHorizon) {
  const auto sixMp = kaplanMeier(tallyOf(kSixMp));
  const auto placebo = kaplanMeier(tallyOf(kPlacebo));
  const double tau = commonHorizon({sixMp, placebo});
  EXPECT_EQ(tau, 35.0);  // the longest follow-up of the two arms
  const auto a = restrictedMean(sixMp, tau);
  EXPECT_NEAR(a.mean, 23.28739, 5e-6);
  EXPECT_NEAR(a.stdErr, 2.82747, 5e-6);
  const auto b = restrictedMean(placebo, tau);
  EXPECT_NEAR(b.mean, 8.66667, 5e-6);
  EXPECT_NEAR(b.stdErr, 1.37739, 5e-6);
}

TEST(RestrictedMean, WithoutCensoringIsTheSampleMean) {
  // With no censoring the area under the curve is the sample mean and its
  // error the usual sqrt(Σ(x − x̄)² / n) / sqrt(n) (textbook identity, common practice).
  const auto c = kaplanMeier(tallyOf(kPlacebo));
  const auto r = restrictedMean(c, 23.0);
  double sum = 0, sq = 0;
  for (const auto& o : kPlacebo) sum += o.time;
  const double mean = sum / 21.0;
  for (const auto& o : kPlacebo) sq += (o.time - mean) * (o.time - mean);
  EXPECT_NEAR(r.mean, mean, 1e-12);
  EXPECT_NEAR(r.stdErr, std::sqrt(sq / 21.0) / std::sqrt(21.0), 1e-12);
  // A horizon before the first time: the mean is the horizon itself.
  EXPECT_EQ(restrictedMean(c, 0.5).mean, 0.5);
  EXPECT_EQ(restrictedMean(c, 0.5).stdErr, 0.0);
}

}  // namespace
}  // namespace budledger::stats
