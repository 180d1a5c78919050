// The truth the simulator writes is what core/lineage would derive from its own
// events, and obeys the tenure rules of lineage.h.
#include <gtest/gtest.h>

#include <map>

#include "core/lineage/lineage.h"
#include "demo/biology.h"
#include "sim_fixtures.h"

namespace budledger::demo {
namespace {

using testing::eventsOf;

// A busy population: washouts, arrivals, corpses flushed, late deaths.
Scenario busyScenario(std::uint64_t seed) {
  Scenario s;
  s.seed = seed;
  s.frames = 300;
  s.device.rows = 12;
  s.device.cols = 12;
  s.biology.medianRls = 10;
  s.biology.washoutPerHour = 0.03;
  s.biology.arrivalPerHour = 0.3;
  s.biology.corpseStayProbability = 0.5;
  s.biology.corpseFlushMin = 200;
  s.biology.initialOccupancy = 0.7;
  s.groups.push_back(GroupSpec{"busy", 1, s.biology});
  return s;
}

void expectLineageReproducesTruth(const Scenario& s) {
  const auto positions = positionsOf(s);
  for (const auto& spec : positions) {
    const PositionModel m = modelPosition(s, spec);
    const auto result = lineage::tenuresFromEvents(eventsOf(m.truth), s.frames);
    EXPECT_TRUE(result.ignored.empty()) << spec.name;
    ASSERT_EQ(result.tenures.size(), m.truth.tenures.size()) << spec.name;
    for (std::size_t i = 0; i < result.tenures.size(); ++i) {
      const auto& got = result.tenures[i];
      const auto& want = m.truth.tenures[i];
      SCOPED_TRACE(::testing::Message()
                   << spec.name << " trap " << want.trap << " mother " << want.mother);
      EXPECT_EQ(got.trap, want.trap);
      EXPECT_EQ(got.mother, want.mother);
      EXPECT_EQ(got.firstFrame, want.firstFrame);
      EXPECT_EQ(got.lastFrame, want.lastFrame);
      EXPECT_EQ(got.divisions, want.divisions);
      EXPECT_EQ(got.outcome == Outcome::Death, want.died);
    }
  }
}

TEST(Truth, LineageOfTheEventsIsTheLifespanTable) {
  expectLineageReproducesTruth(testing::tinyScenario());
  for (std::uint64_t seed : {1, 2, 3}) expectLineageReproducesTruth(busyScenario(seed));
}

TEST(Truth, TenuresFollowTheRules) {
  const Scenario s = busyScenario(11);
  const PositionModel m = modelPosition(s, positionsOf(s)[0]);
  std::map<std::pair<int, int>, std::vector<TruthEvent>> byMother;
  for (const auto& e : m.truth.events) byMother[{e.trap, e.mother}].push_back(e);
  int washouts = 0, arrivals = 0, deaths = 0, endOfMovie = 0;
  for (const auto& t : m.truth.tenures) {
    const auto& ev = byMother[{t.trap, t.mother}];
    ASSERT_FALSE(ev.empty());
    int separations = 0;
    bool washed = false, arrived = false, died = false;
    for (const auto& e : ev) {
      EXPECT_GE(e.frame, t.firstFrame);
      EXPECT_LT(e.frame, s.frames);
      if (e.kind == EventKind::Separation) {
        ++separations;
        EXPECT_LE(e.frame, t.lastFrame);
      }
      if (e.kind == EventKind::Washout) {
        washed = true;
        EXPECT_EQ(t.lastFrame, e.frame - 1);  // first frame without the mother
      }
      if (e.kind == EventKind::Arrival) {
        arrived = true;
        EXPECT_EQ(e.frame, t.firstFrame);
      }
      if (e.kind == EventKind::Death) {
        died = true;
        EXPECT_EQ(t.lastFrame, e.frame);
      }
    }
    EXPECT_EQ(separations, t.divisions);
    EXPECT_EQ(died, t.died);
    if (!arrived) {
      EXPECT_EQ(t.firstFrame, 0);
    }
    if (!t.died && !washed) {
      EXPECT_EQ(t.lastFrame, s.frames - 1);  // censored at the end of imaging
      ++endOfMovie;
    }
    washouts += washed;
    arrivals += arrived;
    deaths += died;
  }
  // The scenario is busy enough that every kind of ending occurs.
  EXPECT_GT(washouts, 5);
  EXPECT_GT(arrivals, 5);
  EXPECT_GT(deaths, 20);
  EXPECT_GT(endOfMovie, 5);
}

TEST(Truth, FrameAtIsTheFirstFrameAtOrAfter) {
  EXPECT_EQ(frameAt(0.0, 10.0), 0);
  EXPECT_EQ(frameAt(0.1, 10.0), 1);
  EXPECT_EQ(frameAt(10.0, 10.0), 1);
  EXPECT_EQ(frameAt(10.0001, 10.0), 2);
  EXPECT_EQ(frameAt(0.3, 0.1), 3);  // 3·0.1 rounds to 0.30000000000000004 >= 0.3
}

}  // namespace
}  // namespace budledger::demo
