// The cohort tally: construction, one-edit updates, and bad input.
#include <gtest/gtest.h>

#include "core/base/error.h"
#include "core/stats/cohort.h"
#include "core/stats/kaplan_meier.h"
#include "tests/core/stats/datasets.h"

namespace budledger::stats {
namespace {

using namespace testdata;

TEST(Cohort, TalliesByGroupAndStratum) {
  Cohort c({{Lifespan{5, true, "b", "s2"}, Lifespan{5, false, "b", "s2"},
             Lifespan{3, true, "a", "s1"}, Lifespan{5, true, "a", "s2"}}});
  EXPECT_EQ(c.size(), 4);
  EXPECT_EQ(c.groups(), (std::vector<std::string>{"a", "b"}));
  EXPECT_EQ(c.strata(), (std::vector<std::string>{"s1", "s2"}));
  const Tally& bs2 = c.cell(1, 1);
  ASSERT_EQ(bs2.size(), 1u);
  EXPECT_EQ(bs2[0].events, 1);
  EXPECT_EQ(bs2[0].censored, 1);
  EXPECT_TRUE(c.cell(1, 0).empty());
  const Tally a = c.groupTally(0);
  ASSERT_EQ(a.size(), 2u);
  EXPECT_EQ(a[0].time, 3);
  EXPECT_EQ(c.stratumTally(1)[0].total(), 3);
}

TEST(Cohort, OneEditEqualsRebuild) {
  auto all = concat(lifespans(kSixMp, "6-MP"), lifespans(kPlacebo, "placebo"));
  Cohort live(all);
  // A proofreader moves one death from 8 to 9 divisions and marks a 6-MP mother dead.
  live.remove({8, true, "placebo", {}});
  live.add({9, true, "placebo", {}});
  live.remove({25, false, "6-MP", {}});
  live.add({25, true, "6-MP", {}});
  for (auto& l : all) {
    if (l.group == "placebo" && l.divisions == 8) {
      l.divisions = 9;
      break;
    }
  }
  for (auto& l : all) {
    if (l.group == "6-MP" && l.divisions == 25) l.event = true;
  }
  Cohort rebuilt(all);
  ASSERT_EQ(live.groups(), rebuilt.groups());
  for (std::size_t g = 0; g < 2; ++g) {
    const auto a = kaplanMeier(live.groupTally(g));
    const auto b = kaplanMeier(rebuilt.groupTally(g));
    ASSERT_EQ(a.steps.size(), b.steps.size());
    for (std::size_t i = 0; i < a.steps.size(); ++i) {
      EXPECT_EQ(a.steps[i].time, b.steps[i].time);
      EXPECT_EQ(a.steps[i].survival, b.steps[i].survival);
    }
  }
}

TEST(Cohort, RemovingTheLastMotherDropsItsLabels) {
  Cohort c({{Lifespan{2, true, "a", "x"}, Lifespan{4, false, "b", "y"}}});
  c.remove({4, false, "b", "y"});
  EXPECT_EQ(c.groups(), std::vector<std::string>{"a"});
  EXPECT_EQ(c.strata(), std::vector<std::string>{"x"});
  EXPECT_THROW(c.remove({4, false, "b", "y"}), std::invalid_argument);
  EXPECT_THROW(c.remove({2, false, "a", "x"}), std::invalid_argument);  // wrong outcome
  c.remove({2, true, "a", "x"});
  EXPECT_TRUE(c.empty());
  EXPECT_TRUE(c.groups().empty());
}

TEST(Cohort, NegativeDivisionsAreBadInput) {
  Cohort c;
  EXPECT_THROW(c.add({-1, true, "a", {}}), InputError);
  EXPECT_TRUE(c.empty());
  try {
    checkLifespan({-3, false, "a", {}});
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("-3"), std::string::npos);
  }
}

}  // namespace
}  // namespace budledger::stats
