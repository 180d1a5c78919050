// Accuracy of the whole engine on simulated positions with seeds it was never tuned
// or trained on (the shipped occupancy model came from seeds 101-104). The bounds
// are regression guards at the level the engine reaches today, below the Engine
// issue's targets; docs/validation.md reports the full numbers and the gap.
#include <gtest/gtest.h>

#include <iostream>

#include "simulated.h"

namespace budledger::engine {
namespace {

demo::Scenario small(std::uint64_t seed, demo::Difficulty d, int frames) {
  demo::Scenario s = demo::presetScenario(seed, d);
  s.frames = frames;
  for (auto& g : s.groups) g.positions = 1;
  s.groups.resize(1);
  return s;
}

TEST(EngineAccuracy, NormalDifficultyFreshSeed) {
  const auto s = testing::simulateAndScore(small(7301, demo::Difficulty::Normal, 120), "normal");
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.80);
  EXPECT_GE(s.kind(EventKind::Bud).f1(), 0.70);
  EXPECT_LE(std::abs(s.bias), 0.5);
  EXPECT_LE(s.mae, 1.0);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.9);
}

TEST(EngineAccuracy, EasyDifficultyFreshSeed) {
  const auto s = testing::simulateAndScore(small(7302, demo::Difficulty::Easy, 120), "easy");
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.85);
  EXPECT_LE(std::abs(s.bias), 0.6);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.85);
}

// End to end on a fresh preset whose found lattice puts the cup centre about one
// mother radius (9 px) beside where mothers sit: the engine finds the seat from the
// mothers themselves (with a search of one radius it stayed put: separation F1 0.69).
TEST(EngineAccuracy, SeatFoundWhenTheLatticeIsARadiusOff) {
  const auto s =
      testing::simulateAndScore(small(9301, demo::Difficulty::Normal, 216), "seat", true);
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.85);
  EXPECT_LE(s.mae, 1.5);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.85);
}

// End to end on a fresh preset whose found lattice puts the cup centre 6-7 px off the
// seat, where a cup disk of the usual size straddles post edges and no trap ever looks
// empty: the engine tries other and smaller disks and keeps the one over the cup
// (keeping the guess, as before, gave separation F1 0.11 on this position).
TEST(EngineAccuracy, CupDiskFoundWhenTheGuessSeesNoEmptyTrap) {
  const auto s = testing::simulateAndScore(small(9303, demo::Difficulty::Easy, 216), "cup", true);
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.9);
  EXPECT_LE(s.mae, 1.0);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.9);
}

// A held-out easy preset (arc posts, wide inlet) where the usual cup disk over the true
// cup centre straddles post edges and sees no empty trap, while a disk of the usual
// size resting on a post 1.5 radii off still passes with a plausible count. Smaller
// disks were tried only when no usual one passed, so that post disk was kept, the
// mothers were looked for beside the cup and none was found: no event at all, 20 traps
// flagged as never occupied. Both sizes now compete (separation F1 0.99 here).
TEST(EngineAccuracy, CupDiskOverThePostsLosesToASmallerOneOverTheCup) {
  const auto s = testing::simulateAndScore(small(9703, demo::Difficulty::Easy, 216), "cup-size");
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.9);
  EXPECT_LE(s.mae, 1.0);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.9);
}

// A held-out hard preset with camera noise about three times the usual: empty and
// occupied samples differ by just under a factor 2 in their distances to other traps.
// When that split was refused, no trap was found empty, the backgrounds held cells,
// the outline sign came out wrong and nothing was found (separation F1 0.002).
TEST(EngineAccuracy, EmptyTrapsFoundInANoisyMovie) {
  const auto s = testing::simulateAndScore(small(9809, demo::Difficulty::Hard, 216), "noisy");
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.6);
  EXPECT_LE(s.mae, 4.0);
}

// Newcomers washed into emptied traps are smaller than the mothers already seated.
// Their morphology deviates from the position's live reference the other way from the
// swelling at death, and was read as death: on this position 6 of 51 tenures split
// into short dead records (death F1 0.08). Deviations the other way from death are no
// sign of it (emission.cpp). False deaths are what this guards, not their timing (a
// known weak spot, docs/validation.md), so deaths are scored within two hours (12
// frames). At +-1 frame they came to F1 0 here once the simulator's bud-site rule
// redrew this position: all 7 deaths found, but 3-8 frames early.
TEST(EngineAccuracy, NewcomersAreNotDeadOnArrival) {
  evaluate::ScoreOptions withinTwoHours;
  withinTwoHours.tolerance = 12;
  const auto s = testing::simulateAndScore(small(8001, demo::Difficulty::Normal, 216), "newcomer",
                                           false, withinTwoHours);
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Arrival).precision(), 0.9);
  EXPECT_GE(s.kind(EventKind::Death).precision(), 0.8);
  EXPECT_GE(s.kind(EventKind::Death).recall(), 0.8);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.97);
}

// A fresh preset with few deaths and many daughters pressed against their mothers for
// hours. Learned from those stretches, the dead state's bud ratio became a home for
// them (mean 0.42, SD 0.31, against 0.18 where deaths are many), and 13 of 48 tenures
// split at a false death and arrival. What a dead mother's bud looks like is no longer
// learned (emission.cpp).
TEST(EngineAccuracy, PressedDaughtersAreNotDeaths) {
  const auto s = testing::simulateAndScore(small(9405, demo::Difficulty::Normal, 200), "pressed");
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(static_cast<double>(s.oneRecord) / std::max(1, s.mothers), 0.9);
  EXPECT_GE(s.kind(EventKind::Arrival).precision(), 0.75);
  EXPECT_LE(s.mae, 1.6);
}

// Daughters that stay in view after they separate: carried off slowly (15 min in view on
// average) or lodged beside the mother (one in ten). Read right beside her, a daughter
// kept her cycle open and the next one merged into it; a former bud now read apart from
// the mother and further out counts as departed (features.h, departedArea). Before:
// separation recall 0.915, RLS exact 51%, bias -0.77; after: 0.937, 67%, -0.47.
TEST(EngineAccuracy, DaughtersWhoStayInViewStillSeparate) {
  const auto scenario = demo::scenarioFromJsonText(R"({
    "name": "lingering daughters", "seed": 7401, "frames": 160, "interval_min": 10,
    "groups": [{"name": "v", "positions": 1}], "device": {"rows": 6, "cols": 7},
    "biology": {"linger_min": 15, "lodge_probability": 0.1}})",
                                                   "lingering");
  const auto s = testing::simulateAndScore(scenario, "lingering");
  std::cerr << evaluate::toMarkdown(s);
  EXPECT_GE(s.kind(EventKind::Separation).recall(), 0.925);
  EXPECT_GE(s.exactRate(), 0.6);
  EXPECT_LE(std::abs(s.bias), 0.6);
}

}  // namespace
}  // namespace budledger::engine
