// Cox proportional hazards against the leukaemia example (data: Freireich et
// al. 1963 via Gehan 1965). Expected values: R survival 3.5-3 coxph
// (../shared/reference/survival-check-values.md) unless a line says otherwise.
#include <gtest/gtest.h>

#include <cmath>

#include "core/stats/cox.h"
#include "core/stats/log_rank.h"
#include "tests/core/stats/datasets.h"

namespace budledger::stats {
namespace {

using namespace testdata;

Cohort leukaemia() {
  return Cohort(concat(lifespans(kSixMp, "6-MP"), lifespans(kPlacebo, "placebo")));
}

TEST(Cox, EfronTiesMatchR) {
  const auto c = coxByGroup(leukaemia());
  ASSERT_TRUE(c.fit.estimable) << c.fit.problem;
  EXPECT_EQ(c.reference, "6-MP");
  ASSERT_EQ(c.ratios.size(), 1u);
  const auto& hr = c.ratios[0];
  EXPECT_EQ(hr.group, "placebo");
  EXPECT_NEAR(hr.coef, 1.5721251, 5e-8);
  EXPECT_NEAR(hr.stdErr, 0.4123967, 5e-8);
  EXPECT_NEAR(hr.hazardRatio, std::exp(1.5721251), 5e-7);
  EXPECT_NEAR(hr.lower, std::exp(hr.coef - 1.959963984540054 * hr.stdErr), 1e-12);
  EXPECT_NEAR(hr.upper, std::exp(hr.coef + 1.959963984540054 * hr.stdErr), 1e-12);
  // Log-likelihoods and tests printed by R survival 3.5-3 for this fit, run live:
  // loglik −93.1842699968 (null), −85.0084245774; score 17.2465367957.
  EXPECT_NEAR(c.fit.logLikNull, -93.1842699968, 1e-9);
  EXPECT_NEAR(c.fit.logLik, -85.0084245774, 1e-9);
  EXPECT_NEAR(c.fit.score, 17.2465367957, 1e-9);
  EXPECT_NEAR(c.fit.wald, 14.5326170634, 1e-8);
}

TEST(Cox, BreslowTies) {
  const auto c = coxByGroup(leukaemia(), {CoxTies::Breslow});
  ASSERT_TRUE(c.fit.estimable);
  EXPECT_NEAR(c.ratios[0].coef, 1.5091914, 5e-8);
}

TEST(Cox, GeneralDesignAgreesWithGroupDesign) {
  std::vector<CoxRecord> records;
  for (const auto& o : kSixMp) records.push_back({double(o.time), o.event, 0, {0.0}});
  for (const auto& o : kPlacebo) records.push_back({double(o.time), o.event, 0, {1.0}});
  const auto fit = fitCox(records);
  ASSERT_TRUE(fit.estimable);
  EXPECT_NEAR(fit.coef[0], coxByGroup(leukaemia()).ratios[0].coef, 1e-12);
  // Shifting and scaling a covariate: coefficient scales inversely, likelihood
  // unchanged (invariance of the partial likelihood; common practice).
  for (auto& r : records) r.covariates[0] = 3.0 - 2.0 * r.covariates[0];
  const auto scaled = fitCox(records);
  EXPECT_NEAR(scaled.coef[0], -fit.coef[0] / 2.0, 1e-11);
  EXPECT_NEAR(scaled.logLik, fit.logLik, 1e-10);
}

TEST(Cox, StratifiedScoreTestIsTheLogRankWithoutTies) {
  // Without tied times the Cox score test at 0 is the log-rank statistic
  // (Cox 1972; Mantel 1966), also stratum by stratum. Distinct times per stratum.
  std::vector<Lifespan> all;
  const int a1[] = {2, 5, 9, 14, 20, 31}, b1[] = {1, 3, 4, 8, 11};
  const int a2[] = {6, 12, 18, 25}, b2[] = {7, 10, 13, 16, 22, 27};
  for (int t : a1) all.push_back({t, t % 3 != 0, "a", "s1"});
  for (int t : b1) all.push_back({t, true, "b", "s1"});
  for (int t : a2) all.push_back({t, true, "a", "s2"});
  for (int t : b2) all.push_back({t, t % 4 != 0, "b", "s2"});
  Cohort c(all);
  const auto cox = coxByGroup(c);
  const auto lr = logRank(c);
  ASSERT_TRUE(lr.defined);
  EXPECT_NEAR(cox.fit.score, lr.chiSquare, 1e-12);
}

TEST(Cox, GroupWithoutDeathsIsNotEstimable) {
  // Monotone likelihood: the hazard ratio runs off to 0 (R warns that the
  // coefficient may be infinite). Reported, not shown as an estimate.
  Cohort c(concat(lifespans({{1, true}, {2, true}, {3, true}}, "a"),
                  lifespans({{4, false}, {5, false}, {6, false}}, "b")));
  const auto r = coxByGroup(c);
  EXPECT_FALSE(r.fit.estimable);
  EXPECT_FALSE(r.fit.problem.empty());
  EXPECT_TRUE(r.ratios.empty());
}

TEST(Cox, OneGroupOrNoDeaths) {
  EXPECT_FALSE(coxByGroup(Cohort(lifespans(kSixMp, "only"))).fit.estimable);
  const auto none =
      coxByGroup(Cohort(concat(lifespans({{3, false}}, "a"), lifespans({{4, false}}, "b"))));
  EXPECT_FALSE(none.fit.estimable);
  EXPECT_EQ(none.fit.problem, "no deaths");
}

TEST(Cox, EfronClosedFormEqualsTheTermByTermSum) {
  // Large tie blocks (hundreds of deaths at one time) summed term by term and
  // in closed form must give the same fit; three groups, two strata.
  std::vector<Lifespan> all;
  for (int i = 0; i < 3000; ++i) {
    const int g = i % 3;
    const int t = (i * 7919) % (20 + 5 * g);
    all.push_back({t, (i % 5) != 0, std::string(1, char('a' + g)), i % 2 ? "x" : "y"});
  }
  Cohort c(all);
  CoxOptions loop, closed;
  loop.efronClosedFormFrom = 1000000;
  closed.efronClosedFormFrom = 1;
  const auto a = coxByGroup(c, loop);
  const auto b = coxByGroup(c, closed);
  ASSERT_TRUE(a.fit.estimable);
  ASSERT_TRUE(b.fit.estimable);
  EXPECT_NEAR(b.fit.logLik / a.fit.logLik, 1.0, 1e-14);
  EXPECT_NEAR(b.fit.logLikNull / a.fit.logLikNull, 1.0, 1e-14);
  EXPECT_NEAR(b.fit.score / a.fit.score, 1.0, 1e-11);
  for (std::size_t j = 0; j < 2; ++j) {
    EXPECT_NEAR(b.fit.coef[j] / a.fit.coef[j], 1.0, 1e-11);
    EXPECT_NEAR(b.fit.stdErr[j] / a.fit.stdErr[j], 1.0, 1e-11);
  }
}

TEST(Cox, ThreeGroups) {
  Cohort c(concat(concat(lifespans(kSixMp, "a"), lifespans(kPlacebo, "b")),
                  lifespans(kAmlNonmaintained, "c")));
  const auto r = coxByGroup(c);
  ASSERT_TRUE(r.fit.estimable);
  ASSERT_EQ(r.ratios.size(), 2u);
  EXPECT_EQ(r.ratios[1].group, "c");
  EXPECT_EQ(r.fit.df, 2);
  // At the maximum the score vanishes, so the LR statistic is positive.
  EXPECT_GT(r.fit.likelihoodRatio, 0.0);
}

}  // namespace
}  // namespace budledger::stats
