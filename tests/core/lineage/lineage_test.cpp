#include "core/lineage/lineage.h"

#include <gtest/gtest.h>

namespace budledger::lineage {
namespace {

Event ev(int trap, int frame, EventKind kind, std::int64_t id = 0) {
  Event e;
  e.id = id;
  e.trap = trap;
  e.frame = frame;
  e.kind = kind;
  return e;
}

TEST(Lineage, MotherPresentFromStartDividesAndDies) {
  const auto r = tenuresFromEvents(
      {ev(1, 3, EventKind::Bud), ev(1, 9, EventKind::Separation), ev(1, 12, EventKind::Bud),
       ev(1, 18, EventKind::Separation), ev(1, 40, EventKind::Death)},
      100);
  ASSERT_EQ(r.tenures.size(), 1u);
  const Tenure& t = r.tenures[0];
  EXPECT_EQ(t.firstFrame, 0);
  EXPECT_EQ(t.lastFrame, 40);
  EXPECT_EQ(t.divisions, 2);
  EXPECT_EQ(t.outcome, Outcome::Death);
}

TEST(Lineage, WashoutCensorsAndArrivalOpensNewMother) {
  const auto r =
      tenuresFromEvents({ev(2, 5, EventKind::Separation), ev(2, 20, EventKind::Washout),
                         ev(2, 30, EventKind::Arrival), ev(2, 40, EventKind::Separation)},
                        60);
  ASSERT_EQ(r.tenures.size(), 2u);
  EXPECT_EQ(r.tenures[0].outcome, Outcome::Washout);
  EXPECT_EQ(r.tenures[0].lastFrame, 19);
  EXPECT_EQ(r.tenures[0].divisions, 1);
  EXPECT_EQ(r.tenures[1].mother, 1);
  EXPECT_EQ(r.tenures[1].firstFrame, 30);
  EXPECT_EQ(r.tenures[1].lastFrame, 59);
  EXPECT_EQ(r.tenures[1].outcome, Outcome::EndOfImaging);
  EXPECT_TRUE(isCensored(r.tenures[1].outcome));
}

TEST(Lineage, DeathIsAbsorbing) {
  const auto r =
      tenuresFromEvents({ev(1, 10, EventKind::Separation), ev(1, 20, EventKind::Death, 7),
                         ev(1, 25, EventKind::Separation, 8)},
                        50);
  ASSERT_EQ(r.tenures.size(), 1u);
  EXPECT_EQ(r.tenures[0].divisions, 1);
  EXPECT_EQ(r.tenures[0].outcome, Outcome::Death);
  EXPECT_EQ(r.tenures[0].lastFrame, 20);
  ASSERT_EQ(r.ignored.size(), 1u);
  EXPECT_EQ(r.ignored[0], 8);
}

TEST(Lineage, ArrivalAfterDeathReplacesTheDeadMother) {
  const auto r = tenuresFromEvents({ev(1, 20, EventKind::Death), ev(1, 30, EventKind::Arrival),
                                    ev(1, 35, EventKind::Separation)},
                                   50);
  ASSERT_EQ(r.tenures.size(), 2u);
  EXPECT_EQ(r.tenures[0].outcome, Outcome::Death);
  EXPECT_EQ(r.tenures[0].divisions, 0);
  EXPECT_EQ(r.tenures[1].divisions, 1);
}

TEST(Lineage, TrapsAreIndependentAndOrderDoesNotMatter) {
  const auto r =
      tenuresFromEvents({ev(3, 9, EventKind::Separation), ev(1, 4, EventKind::Separation),
                         ev(3, 2, EventKind::Separation)},
                        10);
  ASSERT_EQ(r.tenures.size(), 2u);
  EXPECT_EQ(r.tenures[0].trap, 1);
  EXPECT_EQ(r.tenures[0].divisions, 1);
  EXPECT_EQ(r.tenures[1].trap, 3);
  EXPECT_EQ(r.tenures[1].divisions, 2);
  EXPECT_EQ(r.tenures[1].separationFrames, (std::vector<int>{2, 9}));
}

TEST(Lineage, NoEventsNoTenures) { EXPECT_TRUE(tenuresFromEvents({}, 100).tenures.empty()); }

}  // namespace
}  // namespace budledger::lineage
