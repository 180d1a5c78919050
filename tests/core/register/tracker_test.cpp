// Continuity over a movie: drift across several trap pitches, jumps,
// unmeasurable frames and the frame-0 convention.
#include <gtest/gtest.h>

#include "core/register/register.h"
#include "core/traps/lattice.h"
#include "core/traps/structure_map.h"
#include "tests/core/common/synthetic_scene.h"

namespace budledger::registration {
namespace {
using testing::SceneOptions;
using testing::SyntheticScene;

struct Movie {
  SceneOptions options;
  std::vector<cv::Point2d> shifts;
  std::vector<testing::FrameEffects> effects;
};

DriftTrack track(const Movie& movie, const SyntheticScene& scene) {
  const cv::Mat ref = scene.render(movie.effects.front());
  const auto lattice = traps::findLattice({ref});
  EXPECT_TRUE(lattice.has_value());
  RegistrationOptions ro;
  ro.searchRadius = 0.45 * lattice->minPitch();
  ro.latticeA = lattice->a;
  ro.latticeB = lattice->b;
  Registrar registrar(ref, traps::structureMap(ref, *lattice), ro);
  DriftTracker tracker(registrar);
  for (size_t t = 0; t < movie.effects.size(); ++t)
    tracker.add(static_cast<int>(t), scene.render(movie.effects[t]));
  return tracker.finish();
}

Movie drifting(int frames, cv::Point2d perFrame, SceneOptions o = {}) {
  Movie m;
  o.size = {384, 320};
  o.freeCells = 12;
  m.options = o;
  for (int t = 0; t < frames; ++t) {
    m.shifts.push_back(perFrame * t);
    m.effects.push_back({perFrame * t, 1.0, 0, t});
  }
  return m;
}

// A whole-frame correlation may take the nearest lattice alias; following the
// stage frame by frame never looks that far.
TEST(Tracker, FollowsDriftOverSeveralTrapPitches) {
  Movie m = drifting(40, {2.6, 0.9});  // 101 px in x: more than 1.5 pitches of 64 px
  const SyntheticScene scene(m.options);
  const DriftTrack d = track(m, scene);
  ASSERT_EQ(d.size(), 40u);
  for (size_t t = 0; t < d.size(); ++t)
    EXPECT_LT(cv::norm(cv::Point2d(d[t].dx, d[t].dy) - m.shifts[t]), 0.1) << t;
  EXPECT_EQ(d[0].dx, 0.0);
  EXPECT_TRUE(d[0].flags & FrameDrift::kReference);
}

TEST(Tracker, JumpsSmallerThanHalfAPitchAreFollowedAndFlagged) {
  Movie m = drifting(16, {0.3, 0.1});
  for (size_t t = 8; t < m.shifts.size(); ++t) {
    m.shifts[t] += cv::Point2d(-22, 15);  // 0.41 of the 64 px pitch
    m.effects[t].shift = m.shifts[t];
  }
  const SyntheticScene scene(m.options);
  const DriftTrack d = track(m, scene);
  for (size_t t = 0; t < d.size(); ++t) {
    EXPECT_LT(cv::norm(cv::Point2d(d[t].dx, d[t].dy) - m.shifts[t]), 0.1) << t;
    EXPECT_EQ((d[t].flags & FrameDrift::kJump) != 0, t == 8) << t;
  }
}

// A jump of 0.85 pitch lies closer to the alias one pitch back (10 px from the last
// position) than to where the stage went; the posts match either way. The previous
// frame's cells, seated in some cups and not others, tell the two apart.
TEST(Tracker, JumpsOfNearlyAPitchAreNotTakenForTheirAlias) {
  Movie m = drifting(16, {0.3, 0.1});
  for (size_t t = 8; t < m.shifts.size(); ++t) {
    m.shifts[t] += cv::Point2d(54, 0);  // 0.85 of the 64 px pitch
    m.effects[t].shift = m.shifts[t];
  }
  const SyntheticScene scene(m.options);
  const DriftTrack d = track(m, scene);
  for (size_t t = 0; t < d.size(); ++t)
    EXPECT_LT(cv::norm(cv::Point2d(d[t].dx, d[t].dy) - m.shifts[t]), 0.1) << t;
}

TEST(Tracker, UnmeasurableFramesAreInterpolatedAndDistrusted) {
  Movie m = drifting(12, {0.5, 0.25});
  const SyntheticScene scene(m.options);
  // Frame 6: the lamp fails (almost no light, only noise).
  m.effects[6].gain = 0.02;
  const DriftTrack d = track(m, scene);
  EXPECT_TRUE(d[6].flags & FrameDrift::kInterpolated);
  EXPECT_LT(d[6].confidence, 0.35);
  EXPECT_LT(cv::norm(cv::Point2d(d[6].dx, d[6].dy) - m.shifts[6]), 0.2);
  for (size_t t : {5u, 7u}) {
    EXPECT_FALSE(d[t].flags & FrameDrift::kInterpolated);
    EXPECT_GT(d[t].confidence, 0.8);
  }
}

TEST(Tracker, BlurLowersConfidenceButKeepsTheMeasurement) {
  Movie m = drifting(10, {0.4, -0.3});
  m.effects[4].blurSigma = 3.5;
  const SyntheticScene scene(m.options);
  const DriftTrack d = track(m, scene);
  EXPECT_LT(d[4].focus, 0.5);
  EXPECT_LT(d[4].confidence, 0.6);
  EXPECT_GT(d[3].confidence, 0.8);
  EXPECT_LT(cv::norm(cv::Point2d(d[4].dx, d[4].dy) - m.shifts[4]), 0.5);
}

}  // namespace
}  // namespace budledger::registration
