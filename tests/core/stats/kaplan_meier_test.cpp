// Kaplan–Meier curves against published worked examples. Data: Freireich et
// al. (1963) via Gehan (1965), and Miller (1981). Expected numbers: R survival
// 3.5-3 survfit/summary (../shared/reference/survival-check-values.md).
#include <gtest/gtest.h>

#include <cmath>

#include "core/stats/kaplan_meier.h"
#include "tests/core/stats/datasets.h"

namespace budledger::stats {
namespace {

using namespace testdata;

const SurvivalStep& stepAt(const SurvivalCurve& c, int time) {
  for (const auto& s : c.steps) {
    if (s.time == time) return s;
  }
  throw std::runtime_error("no step at that time");
}

struct Row {
  int t;
  long risk, events;
  double s, se, logLo, logHi, llLo, llHi;
};

// 6-MP table, R survival 3.5-3 (values printed to 6 decimals).
const Row kSixMpTable[] = {
    {6, 21, 3, 0.857143, 0.076360, 0.719817, 1.0, 0.619718, 0.951552},
    {7, 17, 1, 0.806723, 0.086935, 0.653124, 0.996444, 0.563147, 0.922809},
    {10, 15, 1, 0.752941, 0.096350, 0.585919, 0.967575, 0.503200, 0.889362},
    {13, 12, 1, 0.690196, 0.106815, 0.509613, 0.934769, 0.431610, 0.849066},
    {16, 11, 1, 0.627451, 0.114054, 0.439394, 0.895995, 0.367511, 0.804912},
    {22, 7, 1, 0.537815, 0.128234, 0.337037, 0.858201, 0.267779, 0.746791},
    {23, 6, 1, 0.448179, 0.134591, 0.248788, 0.807372, 0.188052, 0.680143},
};

TEST(KaplanMeier, SixMpTableMatchesR) {
  const Tally t = tallyOf(kSixMp);
  const auto logCurve = kaplanMeier(t);
  const auto llCurve = kaplanMeier(t, {0.95, ConfidenceTransform::LogLog});
  EXPECT_EQ(logCurve.n, 21);
  EXPECT_EQ(logCurve.events, 9);
  for (const auto& r : kSixMpTable) {
    SCOPED_TRACE(r.t);
    const auto& s = stepAt(logCurve, r.t);
    EXPECT_EQ(s.nRisk, r.risk);
    EXPECT_EQ(s.nEvent, r.events);
    EXPECT_NEAR(s.survival, r.s, 5e-7);
    ASSERT_TRUE(s.stdErr);
    EXPECT_NEAR(*s.stdErr, r.se, 5e-7);
    EXPECT_NEAR(*s.lower, r.logLo, 5e-7);
    EXPECT_NEAR(*s.upper, r.logHi, 5e-7);
    const auto& l = stepAt(llCurve, r.t);
    EXPECT_NEAR(*l.lower, r.llLo, 5e-7);
    EXPECT_NEAR(*l.upper, r.llHi, 5e-7);
  }
}

TEST(KaplanMeier, CensoredTiesStayAtRisk) {
  // At t = 6, three deaths and one censoring: all four are at risk at 6, and the
  // censored one is still counted at risk; the next time (7) has 21 − 4 = 17 at risk.
  // (R survival 3.5-3, 6-MP table above; the convention of Kaplan & Meier 1958.)
  const auto c = kaplanMeier(tallyOf(kSixMp));
  EXPECT_EQ(stepAt(c, 6).nRisk, 21);
  EXPECT_EQ(stepAt(c, 6).nCensor, 1);
  EXPECT_EQ(stepAt(c, 7).nRisk, 17);
  // Censored-only times are steps too, with the survival carried over.
  EXPECT_EQ(stepAt(c, 9).nEvent, 0);
  EXPECT_DOUBLE_EQ(stepAt(c, 9).survival, stepAt(c, 7).survival);
  EXPECT_EQ(c.steps.size(), 16u);  // distinct times, deaths or censorings
}

TEST(KaplanMeier, PlaceboMatchesRAndEndsAtZero) {
  // Placebo S (SE), R survival 3.5-3.
  const std::pair<int, std::pair<double, double>> expected[] = {
      {1, {.904762, .064056}},  {2, {.809524, .085689}},  {3, {.761905, .092943}},
      {4, {.666667, .102869}},  {5, {.571429, .107990}},  {8, {.380952, .105971}},
      {11, {.285714, .098581}}, {12, {.190476, .085689}}, {15, {.142857, .076360}},
      {17, {.095238, .064056}}, {22, {.047619, .046471}}};
  const auto c = kaplanMeier(tallyOf(kPlacebo));
  for (const auto& [t, v] : expected) {
    SCOPED_TRACE(t);
    EXPECT_NEAR(stepAt(c, t).survival, v.first, 5e-7);
    EXPECT_NEAR(*stepAt(c, t).stdErr, v.second, 5e-7);
  }
  // At 23 the last mother dies: S = 0, and the error and interval are undefined
  // (R prints NaN / NA there), never a number.
  const auto& last = stepAt(c, 23);
  EXPECT_EQ(last.survival, 0.0);
  EXPECT_FALSE(last.stdErr);
  EXPECT_FALSE(last.lower);
  EXPECT_FALSE(last.upper);
  EXPECT_TRUE(std::isinf(last.varLogSurvival));
}

TEST(KaplanMeier, AmlMatchesR) {
  // Miller (1981) data; S (SE) from R survival 3.5-3.
  const auto m = kaplanMeier(tallyOf(kAmlMaintained));
  const std::pair<int, std::pair<double, double>> maintained[] = {
      {9, {.909091, .086678}},  {13, {.818182, .116291}}, {18, {.715909, .139665}},
      {23, {.613636, .152632}}, {31, {.490909, .164193}}, {34, {.368182, .162669}},
      {48, {.184091, .153493}}};
  for (const auto& [t, v] : maintained) {
    SCOPED_TRACE(t);
    EXPECT_NEAR(stepAt(m, t).survival, v.first, 5e-7);
    EXPECT_NEAR(*stepAt(m, t).stdErr, v.second, 5e-7);
  }
  const auto n = kaplanMeier(tallyOf(kAmlNonmaintained));
  const std::pair<int, std::pair<double, double>> non[] = {
      {5, {.833333, .107583}},  {8, {.666667, .136083}},  {12, {.583333, .142319}},
      {23, {.486111, .148130}}, {27, {.388889, .146986}}, {30, {.291667, .138715}},
      {33, {.194444, .121875}}, {43, {.097222, .091866}}};
  for (const auto& [t, v] : non) {
    SCOPED_TRACE(t);
    EXPECT_NEAR(stepAt(n, t).survival, v.first, 5e-7);
    EXPECT_NEAR(*stepAt(n, t).stdErr, v.second, 5e-7);
  }
  EXPECT_EQ(stepAt(n, 45).survival, 0.0);
}

TEST(KaplanMeier, LogLogUndefinedAtOneAndPlainIsClamped) {
  // Before any death S = 1: the log-log transform is undefined there (R: NA);
  // the log interval degenerates to [1, 1]. Common practice, as R survival 3.5-3.
  const std::vector<Obs> obs = {{1, false}, {2, true}, {3, true}, {4, false}};
  const Tally t = tallyOf(obs);
  const auto ll = kaplanMeier(t, {0.95, ConfidenceTransform::LogLog});
  EXPECT_FALSE(ll.steps[0].lower);
  const auto lg = kaplanMeier(t);
  EXPECT_EQ(*lg.steps[0].lower, 1.0);
  EXPECT_EQ(*lg.steps[0].upper, 1.0);
  const auto pl = kaplanMeier(t, {0.95, ConfidenceTransform::Plain});
  for (const auto& s : pl.steps) {
    EXPECT_GE(*s.lower, 0.0);
    EXPECT_LE(*s.upper, 1.0);
    EXPECT_NEAR(*s.upper - s.survival, std::min(1.0 - s.survival, 1.959963984540054 * *s.stdErr),
                1e-12);
  }
}

TEST(KaplanMeier, PlotDataAndNumberAtRisk) {
  const auto c = kaplanMeier(tallyOf(kSixMp));
  EXPECT_EQ(c.survivalAt(0), 1.0);
  EXPECT_EQ(c.survivalAt(5.9), 1.0);
  EXPECT_DOUBLE_EQ(c.survivalAt(6), 18.0 / 21.0);
  EXPECT_DOUBLE_EQ(c.survivalAt(8.5), 18.0 / 21.0 * 16.0 / 17.0);
  const int times[] = {0, 6, 10, 20, 35, 36};
  const auto risk = numberAtRisk(c, times);
  // Counted by hand from the data: lifespans >= t.
  const long expected[] = {21, 21, 15, 8, 1, 0};
  for (std::size_t i = 0; i < risk.size(); ++i) EXPECT_EQ(risk[i].nRisk, expected[i]);
  const auto marks = c.censorMarks();
  ASSERT_EQ(marks.size(), 11u);  // 12 censorings at 11 distinct times (counted by hand)
  EXPECT_EQ(marks.front().time, 6);
  EXPECT_DOUBLE_EQ(marks.front().survival, 18.0 / 21.0);
  EXPECT_EQ(marks[8].time, 32);
  EXPECT_EQ(marks[8].count, 2);
}

TEST(KaplanMeier, EmptyAndAllCensored) {
  const auto empty = kaplanMeier(Tally{});
  EXPECT_EQ(empty.n, 0);
  EXPECT_TRUE(empty.steps.empty());
  EXPECT_FALSE(empty.lastTime());
  const auto none = kaplanMeier(tallyOf({{3, false}, {5, false}}));
  for (const auto& s : none.steps) EXPECT_EQ(s.survival, 1.0);
}

TEST(KaplanMeier, ByGroupUsesSortedLabels) {
  Cohort c(concat(lifespans(kPlacebo, "placebo"), lifespans(kSixMp, "6-MP")));
  const auto curves = kaplanMeierByGroup(c);
  ASSERT_EQ(curves.size(), 2u);
  EXPECT_EQ(curves[0].group, "6-MP");
  EXPECT_EQ(curves[1].group, "placebo");
  EXPECT_EQ(curves[1].events, 21);
}

}  // namespace
}  // namespace budledger::stats
