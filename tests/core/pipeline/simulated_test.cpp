// Ingest on the simulator's positions, scored against its ground truth
// (DIR/truth/<position>/traps.csv and drift.csv): every trap found and none
// invented, ids, rows and columns as the simulator numbers them, each trap
// tracked within 1 px through the movie, and the drift within 0.1 px on
// every frame the tracker itself trusts. The scenarios cover drift with
// jumps and defocus, staggered rows, post geometries other than the
// simulator's default cups, and the simulator's hard presets.
#include <gtest/gtest.h>

#include "core/io/frame_source.h"
#include "core/pipeline/analyze.h"
#include "demo/scenario.h"
#include "demo/simulator.h"
#include "tests/core/common/simulator_truth.h"
#include "tests/core/pipeline/pipeline_support.h"

namespace budledger::pipeline {
namespace {

struct Case {
  const char* name;
  const char* scenario;        // JSON, see docs/simulator.md; nullptr: a hard preset
  std::uint64_t hardSeed = 0;  // the preset's seed (geometry and optics vary with it)
};

const Case kCases[] = {
    {"arc cups, drift with jumps and defocus",
     R"({"seed": 101, "frames": 60, "device": {"rows": 3, "cols": 4},
         "optics": {"drift": 0.25, "jump_rate": 0.06, "jump_px": 14, "defocus_rate": 0.06,
                    "flicker": 0.03},
         "groups": [{"name": "a", "positions": 1}]})"},
    {"staggered pillars, bright rims, flicker",
     R"({"seed": 202, "frames": 60, "compression": "deflate",
         "device": {"rows": 4, "cols": 4, "stagger": 0.5, "post_shape": "pillars",
                    "pitch_x_um": 20, "pitch_y_um": 22},
         "optics": {"polarity": "bright-rim", "halo": 1.2, "flicker": 0.05, "jump_rate": 0.03,
                    "jump_px": 18, "defocus_rate": 0.04},
         "groups": [{"name": "b", "positions": 1}]})"},
    {"block posts, flow to the left, coarser pixels",
     R"({"seed": 303, "frames": 60, "compression": "lzw",
         "device": {"rows": 3, "cols": 4, "post_shape": "block", "flow": "left",
                    "pixel_um": 0.32},
         "optics": {"drift": 0.2, "jump_rate": 0.04, "jump_px": 12, "dust": 3},
         "groups": [{"name": "c", "positions": 1}]})"},
    // `simulate --seed N --difficulty hard`: strong artefacts, trap geometry,
    // pitch and pixel size drawn from the seed.
    {"hard preset, seed 3", nullptr, 3},
    {"hard preset, seed 7", nullptr, 7},
    {"hard preset, seed 9", nullptr, 9},
};

class Simulated : public testsupport::Scratch, public ::testing::WithParamInterface<Case> {};

TEST_P(Simulated, TrapsFoundAndTrackedAgainstTruth) {
  const Case& c = GetParam();
  demo::Scenario scenario = c.scenario ? demo::scenarioFromJsonText(c.scenario, c.name)
                                       : demo::presetScenario(c.hardSeed, demo::Difficulty::Hard);
  if (!c.scenario) scenario.frames = 48;
  demo::simulateExperiment(scenario, dir_);
  int positions = 0;
  for (const auto& entry : std::filesystem::directory_iterator(dir_)) {
    if (entry.path().extension() != ".tif") continue;
    ++positions;
    auto source = io::openStack(entry.path());
    const PositionAnalysis a = analyzeFrames(*source, {}, Progress{});
    const auto truthDir = dir_ / "truth" / a.name;
    const auto truth = testing::readTruthTraps(truthDir / "traps.csv");
    const auto truthDrift = testing::readTruthDrift(truthDir / "drift.csv");
    ASSERT_TRUE(a.layout.lattice) << c.name;
    // Same trap = centres closer than a quarter of the trap pitch.
    const double tolerance = 0.25 * a.layout.lattice->minPitch();
    const auto score = testing::scoreLayout(a.layout, a.drift, truth, truthDrift, tolerance);
    EXPECT_EQ(score.recall, 1.0) << c.name;
    EXPECT_EQ(score.precision, 1.0) << c.name;
    EXPECT_TRUE(score.idsRowMajor) << c.name;
    EXPECT_LT(score.maxTrackError, 1.0)
        << c.name << " (offset to the simulator's seat " << score.offset << " px removed)";
    // Ids, rows and columns as the simulator numbers its traps.
    for (const auto& t : a.layout.traps) {
      const testing::TruthTrap* same = nullptr;
      for (const auto& u : truth)
        if (cv::norm(u.centre - (t.centre - score.offset)) < 2.0) same = &u;
      ASSERT_NE(same, nullptr) << c.name;
      EXPECT_EQ(t.id, same->id) << c.name;
      EXPECT_EQ(t.row, same->row) << c.name;
      EXPECT_EQ(t.col, same->col) << c.name;
      EXPECT_FALSE(t.edge) << c.name << ": the simulator keeps traps inside the frame";
    }
    // Drift: within 0.1 px wherever the tracker is confident.
    // (Frames the tracker distrusts, mostly deep defocus, may err more; the
    // engine is told so by their confidence.)
    double worst = 0, sum = 0;
    int trusted = 0, fair = 0;
    std::string offenders;
    for (size_t f = 0; f < a.drift.size(); ++f) {
      const auto& d = a.drift[f];
      const double err = cv::norm(cv::Point2d(d.dx, d.dy) - truthDrift[f]);
      if (err > 0.1)
        offenders += fmt::format(
            "\n  frame {}: error {:.3f} px, confidence {:.2f}, focus {:.2f}, "
            "flags {}",
            f, err, d.confidence, d.focus, d.flags);
      if (d.confidence >= 0.5) {
        sum += err * err;
        ++fair;
      }
      if (d.confidence >= 0.8) {
        worst = std::max(worst, err);
        ++trusted;
      }
    }
    EXPECT_LT(worst, 0.1) << c.name << offenders;
    EXPECT_LT(std::sqrt(sum / std::max(fair, 1)), 0.1) << c.name;
    EXPECT_GT(trusted, static_cast<int>(0.75 * static_cast<double>(a.drift.size()))) << c.name;
    RecordProperty("max_drift_error_px", std::to_string(worst));
    RecordProperty("max_track_error_px", std::to_string(score.maxTrackError));
  }
  EXPECT_EQ(positions, 1);
}

INSTANTIATE_TEST_SUITE_P(Scenarios, Simulated, ::testing::ValuesIn(kCases), [](const auto& info) {
  return std::string(1, static_cast<char>('A' + info.index));
});

}  // namespace
}  // namespace budledger::pipeline
