#include "core/evaluate/score.h"

#include <gtest/gtest.h>

#include <cmath>

namespace budledger::evaluate {
namespace {

std::vector<std::pair<int, bool>> times(std::initializer_list<int> events,
                                        std::initializer_list<int> censored = {}) {
  std::vector<std::pair<int, bool>> out;
  for (int t : events) out.emplace_back(t, true);
  for (int t : censored) out.emplace_back(t, false);
  return out;
}

// Check values: /work/shared/reference/survival-check-values.md (Freireich et al. 1963 via
// Gehan 1965; Miller 1981 `aml`), medians as given by R survival 3.5-3.
TEST(KaplanMeierMedian, MatchesPublishedDataSets) {
  EXPECT_DOUBLE_EQ(kaplanMeierMedian(times({6, 6, 6, 7, 10, 13, 16, 22, 23},
                                           {6, 9, 10, 11, 17, 19, 20, 25, 32, 32, 34, 35})),
                   23);
  EXPECT_DOUBLE_EQ(kaplanMeierMedian(times(
                       {1, 1, 2, 2, 3, 4, 4, 5, 5, 8, 8, 8, 8, 11, 11, 12, 12, 15, 17, 22, 23})),
                   8);
  EXPECT_DOUBLE_EQ(kaplanMeierMedian(times({9, 13, 18, 23, 31, 34, 48}, {13, 28, 45, 161})), 31);
  EXPECT_DOUBLE_EQ(kaplanMeierMedian(times({5, 5, 8, 8, 12, 23, 27, 30, 33, 43, 45}, {16})), 23);
  // Exactly one half on a flat stretch: midpoint to the next event (R convention).
  EXPECT_DOUBLE_EQ(kaplanMeierMedian(times({1, 2, 3, 4, 5, 6, 7, 8, 9, 10})), 5.5);
  EXPECT_TRUE(std::isnan(kaplanMeierMedian(times({3}, {10, 10, 10}))));
}

TruthPosition onePosition(std::vector<TruthEvent> events, std::vector<TruthTenure> tenures,
                          int frames = 100) {
  TruthPosition p;
  p.name = "P1";
  p.file = "P1.ome.tif";
  p.frames = frames;
  p.intervalMin = 10;
  p.traps = {{0, 0, 0, 100, 100}, {1, 0, 1, 200, 100}, {2, 1, 0, 100, 200}};
  p.events = std::move(events);
  p.tenures = std::move(tenures);
  return p;
}

Event call(int trap, int frame, EventKind kind, double confidence = 0.9) {
  Event e;
  e.trap = trap;
  e.frame = frame;
  e.kind = kind;
  e.confidence = confidence;
  return e;
}

// Engine traps numbered differently and offset by (+7, -5) px from the truth's cup centres.
EnginePosition engineOf(std::vector<Event> events) {
  EnginePosition e;
  e.name = "P1";
  e.frames = 100;
  e.traps = {{10, 107, 95}, {11, 207, 95}, {12, 107, 195}};
  for (auto& ev : events) ev.trap += 10;
  e.events = std::move(events);
  return e;
}

TEST(Score, PerfectCallsScorePerfectly) {
  Truth truth;
  truth.positions.push_back(onePosition(
      {{0, 0, 10, EventKind::Bud}, {0, 0, 20, EventKind::Separation}, {0, 0, 50, EventKind::Death}},
      {{0, 0, 0, 50, 1, true}}));
  const Score s =
      score(truth, {engineOf({call(0, 10, EventKind::Bud), call(0, 21, EventKind::Separation),
                              call(0, 49, EventKind::Death)})});
  EXPECT_EQ(s.trapsMatched, 3);
  EXPECT_DOUBLE_EQ(s.kind(EventKind::Separation).f1(), 1.0);
  EXPECT_DOUBLE_EQ(s.kind(EventKind::Death).f1(), 1.0);
  EXPECT_EQ(s.mothers, 1);
  EXPECT_EQ(s.exact, 1);
  EXPECT_EQ(s.oneRecord, 1);
  EXPECT_EQ(s.spurious, 0);
  EXPECT_EQ(s.edits, 0);
  EXPECT_EQ(s.trueDivisions, 1);
}

TEST(Score, MatchingIsOneToOneAndCountsEdits) {
  Truth truth;
  truth.positions.push_back(
      onePosition({{0, 0, 20, EventKind::Separation}, {0, 0, 40, EventKind::Separation}},
                  {{0, 0, 0, 99, 2, false}}));
  // Two calls near the first separation (one is a duplicate), one call 3 frames off the second.
  const Score s = score(
      truth, {engineOf({call(0, 20, EventKind::Separation), call(0, 21, EventKind::Separation),
                        call(0, 43, EventKind::Separation)})});
  const KindScore& k = s.kind(EventKind::Separation);
  EXPECT_EQ(k.matched, 1);
  EXPECT_EQ(k.moves, 1);    // 43 -> 40
  EXPECT_EQ(k.deletes, 1);  // the duplicate
  EXPECT_EQ(k.adds, 0);
  EXPECT_EQ(s.edits, 2);
  EXPECT_DOUBLE_EQ(s.editsPer100, 100.0);
  EXPECT_EQ(s.exact, 0);
  EXPECT_DOUBLE_EQ(s.bias, 1.0);  // 3 separations counted against 2
}

TEST(Score, FalseWashoutSplitsARecord) {
  Truth truth;
  truth.positions.push_back(
      onePosition({{0, 0, 20, EventKind::Separation}, {0, 0, 60, EventKind::Separation}},
                  {{0, 0, 0, 99, 2, false}}));
  const Score s = score(
      truth, {engineOf({call(0, 20, EventKind::Separation), call(0, 30, EventKind::Washout),
                        call(0, 33, EventKind::Arrival), call(0, 60, EventKind::Separation)})});
  EXPECT_EQ(s.split, 1);
  EXPECT_EQ(s.oneRecord, 0);
  EXPECT_EQ(s.exact, 0);
  EXPECT_DOUBLE_EQ(s.mae, 1.0);
  EXPECT_EQ(s.kind(EventKind::Washout).deletes, 1);
  EXPECT_EQ(s.kind(EventKind::Arrival).deletes, 1);
}

TEST(Score, ReliabilityBinsCountCorrectCalls) {
  Truth truth;
  truth.positions.push_back(
      onePosition({{0, 0, 20, EventKind::Separation}}, {{0, 0, 0, 99, 1, false}}));
  const Score s = score(truth, {engineOf({call(0, 20, EventKind::Separation, 0.97),
                                          call(0, 70, EventKind::Separation, 0.6)})});
  int total = 0;
  for (const auto& b : s.reliability) {
    total += b.count;
    if (b.lo <= 0.97 && 0.97 < b.hi) {
      EXPECT_EQ(b.correct, 1);
    }
    if (b.lo <= 0.6 && 0.6 < b.hi) {
      EXPECT_EQ(b.correct, 0);
    }
  }
  EXPECT_EQ(total, 2);
  EXPECT_GT(s.calibrationError, 0.0);
}

TEST(Score, MissingPositionCountsAsMissed) {
  Truth truth;
  truth.positions.push_back(
      onePosition({{0, 0, 20, EventKind::Separation}}, {{0, 0, 0, 99, 1, false}}));
  ScoreOptions strict;
  strict.skipMissingPositions = false;
  const Score s = score(truth, {}, strict);
  EXPECT_EQ(s.kind(EventKind::Separation).adds, 1);
  EXPECT_EQ(s.missing, 1);
  ASSERT_EQ(s.notes.size(), 1u);
  const Score skipped = score(truth, {});
  EXPECT_EQ(skipped.mothers, 0);
  EXPECT_EQ(skipped.notes.size(), 1u);
}

}  // namespace
}  // namespace budledger::evaluate
