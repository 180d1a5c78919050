// Division-interval profile and the type-7 sample quantile.
#include <gtest/gtest.h>

#include "core/base/error.h"
#include "core/stats/division_intervals.h"

namespace budledger::stats {
namespace {

TEST(SampleQuantile, MatchesRType7) {
  // quantile(c(1, 2, 4, 8), c(.25, .5, .75)) in R 4.2.2 (type 7): 1.75, 3, 5.
  const std::vector<double> v = {8, 1, 4, 2};
  EXPECT_DOUBLE_EQ(sampleQuantile(v, 0.25), 1.75);
  EXPECT_DOUBLE_EQ(sampleQuantile(v, 0.5), 3.0);
  EXPECT_DOUBLE_EQ(sampleQuantile(v, 0.75), 5.0);
  EXPECT_DOUBLE_EQ(sampleQuantile({7}, 0.75), 7.0);
}

TEST(DivisionIntervals, AlignedByAgeAndBeforeDeath) {
  // Frames of 10 minutes. Mother A died: intervals 9, 9, 12, 20 frames.
  // Mother B censored: intervals 8, 10. Mother C died: intervals 10, 30.
  std::vector<MotherDivisions> m = {
      {{5, 14, 23, 35, 55}, true, "wt"},
      {{3, 11, 21}, false, "wt"},
      {{0, 10, 40}, true, "wt"},
      {{2}, true, "wt"},  // one separation: no whole interval
  };
  const auto profiles = divisionIntervalProfiles(m, {10.0});
  ASSERT_EQ(profiles.size(), 1u);
  const auto& p = profiles[0];
  ASSERT_EQ(p.byAge.size(), 4u);
  // Age 1: intervals 90, 80, 100 minutes → median 90, quartiles 85, 95.
  EXPECT_EQ(p.byAge[0].index, 1);
  EXPECT_EQ(p.byAge[0].mothers, 3);
  EXPECT_DOUBLE_EQ(p.byAge[0].median, 90.0);
  EXPECT_DOUBLE_EQ(p.byAge[0].lowerQuartile, 85.0);
  EXPECT_DOUBLE_EQ(p.byAge[0].upperQuartile, 95.0);
  EXPECT_EQ(p.byAge[3].mothers, 1);
  EXPECT_DOUBLE_EQ(p.byAge[3].median, 200.0);
  // Before death (A and C only): last intervals 200 and 300; second-last 120 and 100.
  ASSERT_EQ(p.beforeDeath.size(), 4u);
  EXPECT_EQ(p.beforeDeath[0].mothers, 2);
  EXPECT_DOUBLE_EQ(p.beforeDeath[0].median, 250.0);
  EXPECT_DOUBLE_EQ(p.beforeDeath[1].median, 110.0);
  EXPECT_EQ(p.beforeDeath[3].mothers, 1);
  EXPECT_DOUBLE_EQ(p.beforeDeath[3].median, 90.0);
}

TEST(DivisionIntervals, GroupsAndBadFrames) {
  std::vector<MotherDivisions> m = {{{0, 9, 18}, true, "b"}, {{0, 8}, true, "a"}};
  const auto profiles = divisionIntervalProfiles(m);
  ASSERT_EQ(profiles.size(), 2u);
  EXPECT_EQ(profiles[0].group, "a");
  EXPECT_DOUBLE_EQ(profiles[0].byAge[0].median, 8.0);
  std::vector<MotherDivisions> bad = {{{0, 9, 9}, true, "a"}};
  EXPECT_THROW(divisionIntervalProfiles(bad), InputError);
}

}  // namespace
}  // namespace budledger::stats
