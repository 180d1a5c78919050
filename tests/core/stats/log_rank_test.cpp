// Log-rank and Peto–Peto tests against the leukaemia and aml examples
// (data: Freireich et al. 1963 via Gehan 1965; Miller 1981). Expected values:
// R survival 3.5-3 survdiff (../shared/reference/survival-check-values.md).
#include <gtest/gtest.h>

#include "core/stats/log_rank.h"
#include "tests/core/stats/datasets.h"

namespace budledger::stats {
namespace {

using namespace testdata;

Cohort leukaemia() {
  return Cohort(concat(lifespans(kSixMp, "6-MP"), lifespans(kPlacebo, "placebo")));
}

TEST(LogRank, LeukaemiaMatchesR) {
  const auto r = logRank(leukaemia());
  ASSERT_TRUE(r.defined);
  EXPECT_NEAR(r.chiSquare, 16.79294099, 1e-8 * 16.8);
  EXPECT_EQ(r.df, 1);
  EXPECT_NEAR(r.pValue, 4.16881e-05, 5e-11);
  EXPECT_EQ(r.observed[0], 9.0);
  EXPECT_EQ(r.observed[1], 21.0);
  EXPECT_NEAR(r.expected[0], 19.25050095, 1e-8);
  EXPECT_NEAR(r.expected[1], 10.74949905, 1e-8);
  EXPECT_NEAR(r.variance[0], 6.256960574, 1e-9);
  EXPECT_NEAR(r.variance[1], -6.256960574, 1e-9);
  EXPECT_EQ(r.n[0], 21);
}

TEST(LogRank, PetoPetoWeights) {
  const auto r = logRank(leukaemia(), LogRankOptions::petoPeto());
  ASSERT_TRUE(r.defined);
  EXPECT_NEAR(r.chiSquare, 14.457151, 5e-7);
}

TEST(LogRank, Aml) {
  Cohort c(concat(lifespans(kAmlMaintained, "Maintained"),
                  lifespans(kAmlNonmaintained, "Nonmaintained")));
  const auto r = logRank(c);
  EXPECT_NEAR(r.chiSquare, 3.396388699, 1e-9);
  EXPECT_NEAR(r.pValue, 0.0653393, 5e-8);
}

TEST(LogRank, StratifiedSumsOverStrata) {
  // Both arms spread over two strata. The stratified O − E and V are the sums
  // of the per-stratum tests' (Mantel 1966), checked against separate runs.
  std::vector<Lifespan> all;
  for (std::size_t i = 0; i < kSixMp.size(); ++i) {
    all.push_back({kSixMp[i].time, kSixMp[i].event, "6-MP", i % 2 ? "s1" : "s2"});
  }
  for (std::size_t i = 0; i < kPlacebo.size(); ++i) {
    all.push_back({kPlacebo[i].time, kPlacebo[i].event, "placebo", i % 3 ? "s1" : "s2"});
  }
  const auto strat = logRank(Cohort(all));
  EXPECT_EQ(strat.strata, 2u);
  double o = 0, e = 0, v = 0;
  for (const std::string s : {"s1", "s2"}) {
    std::vector<Lifespan> part;
    for (const auto& l : all) {
      if (l.stratum == s) part.push_back({l.divisions, l.event, l.group, {}});
    }
    const auto r = logRank(Cohort(part));
    o += r.observed[1];
    e += r.expected[1];
    v += r.variance[3];
  }
  ASSERT_TRUE(strat.defined);
  EXPECT_NEAR(strat.chiSquare, (o - e) * (o - e) / v, 1e-12);
  // And it differs from the unstratified test.
  EXPECT_GT(std::abs(strat.chiSquare - logRank(leukaemia()).chiSquare), 1e-3);
}

TEST(LogRank, ThreeGroupsHaveTwoDegreesOfFreedom) {
  Cohort c(concat(concat(lifespans(kSixMp, "a"), lifespans(kPlacebo, "b")),
                  lifespans(kAmlMaintained, "c")));
  const auto r = logRank(c);
  ASSERT_TRUE(r.defined);
  EXPECT_EQ(r.df, 2);
  // Observed and expected balance: Σ O = Σ E (deaths are shared out).
  EXPECT_NEAR(r.observed[0] + r.observed[1] + r.observed[2],
              r.expected[0] + r.expected[1] + r.expected[2], 1e-10);
  // Rows of V sum to zero.
  for (int i = 0; i < 3; ++i) {
    EXPECT_NEAR(r.variance[i * 3] + r.variance[i * 3 + 1] + r.variance[i * 3 + 2], 0.0, 1e-12);
  }
}

TEST(LogRank, OneGroupOrNoDeathsIsNotDefined) {
  const auto one = logRank(Cohort(lifespans(kSixMp, "only")));
  EXPECT_FALSE(one.defined);
  EXPECT_FALSE(one.problem.empty());
  const auto noDeaths =
      logRank(Cohort(concat(lifespans({{3, false}}, "a"), lifespans({{5, false}}, "b"))));
  EXPECT_FALSE(noDeaths.defined);
}

}  // namespace
}  // namespace budledger::stats
