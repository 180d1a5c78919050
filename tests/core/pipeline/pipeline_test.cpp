// analyzePosition on synthetic stacks: what it finds, what it writes, and
// that a failure or cancellation writes nothing.
#include <gtest/gtest.h>

#include <fstream>

#include "core/base/error.h"
#include "core/base/sha256.h"
#include "core/io/frame_source.h"
#include "core/pipeline/analyze.h"
#include "tests/core/common/tiff_writer.h"
#include "tests/core/pipeline/pipeline_support.h"

namespace budledger::pipeline {
namespace {
using testsupport::writeSyntheticStack;

class Analyze : public testsupport::Scratch {};

TEST_F(Analyze, FindsDriftAndEveryTrapOfASyntheticStack) {
  const auto stack = writeSyntheticStack(dir_ / "pos7.ome.tif", 24);
  auto source = io::openStack(stack.path);
  const PositionAnalysis a = analyzeFrames(*source, {}, Progress{});
  EXPECT_EQ(a.name, "pos7");
  ASSERT_EQ(a.drift.size(), 24u);
  for (size_t t = 0; t < a.drift.size(); ++t) {
    const double err = cv::norm(cv::Point2d(a.drift[t].dx, a.drift[t].dy) - stack.drift[t]);
    if (a.drift[t].confidence >= 0.8) {
      EXPECT_LT(err, 0.1) << "frame " << t;
    } else {
      EXPECT_LT(err, 0.5) << "frame " << t;
    }
  }
  EXPECT_LT(a.drift[3].confidence, 0.5) << "the blurred frame";
  EXPECT_TRUE(a.drift[12].flags & registration::FrameDrift::kJump);
  const budledger::testing::SyntheticScene scene(stack.options);
  EXPECT_GE(a.layout.traps.size(), scene.trapCentres().size() - 8);  // cut traps may go either way
  for (const auto& t : a.layout.traps) {
    double best = 1e9;
    for (const auto& c : scene.allTrapCentres()) best = std::min(best, cv::norm(c - t.centre));
    EXPECT_LT(best, 10.0);
  }
  EXPECT_DOUBLE_EQ(a.intervalMin.value_or(0), 10.0);
  EXPECT_DOUBLE_EQ(a.pixelUm.value_or(0), 0.25);
  ASSERT_EQ(a.sha256.size(), 1u);
  EXPECT_EQ(a.sha256[0], sha256FileHex(stack.path));
}

TEST_F(Analyze, WritesPositionInputsDriftAndTrapsTogether) {
  const auto stack = writeSyntheticStack(dir_ / "p1.ome.tif", 10);
  auto project = store::Project::create((dir_ / "e.budledger").string());
  auto source = io::openStack(stack.path);
  AnalyzeOptions options;
  options.group = "control";
  options.intervalMin = 12.5;  // overrides the stack's 10
  const PositionAnalysis a = analyzePosition(project, *source, options, Progress{});
  const auto positions = project.positions();
  ASSERT_EQ(positions.size(), 1u);
  EXPECT_EQ(positions[0].name, "p1");
  EXPECT_EQ(positions[0].group, "control");
  EXPECT_EQ(positions[0].frameCount, 10);
  EXPECT_EQ(positions[0].width, 448);
  const auto inputs = project.inputs();
  ASSERT_EQ(inputs.size(), 1u);
  EXPECT_EQ(inputs[0].path, std::filesystem::absolute(stack.path).lexically_normal().string());
  EXPECT_EQ(inputs[0].sizeBytes, static_cast<std::int64_t>(std::filesystem::file_size(stack.path)));
  EXPECT_EQ(inputs[0].sha256, sha256FileHex(stack.path));
  EXPECT_EQ(project.drift(a.positionId).size(), 10u);
  const auto traps = project.traps(a.positionId);
  ASSERT_EQ(traps.size(), a.layout.traps.size());
  EXPECT_DOUBLE_EQ(traps[3].x, a.layout.traps[3].centre.x);
  EXPECT_EQ(project.meta("interval_min"), "12.5");
  EXPECT_EQ(project.meta("position.p1.pixel_um"), "0.25");
  EXPECT_EQ(project.meta("position.p1.trap_layout"), "detected");
}

TEST_F(Analyze, ATakenNameIsRefusedAndChangesNothing) {
  const auto stack = writeSyntheticStack(dir_ / "p1.tif", 6);
  auto project = store::Project::create((dir_ / "e.budledger").string());
  auto source = io::openStack(stack.path);
  analyzePosition(project, *source, {}, Progress{});
  int reports = 0;
  Progress counting{[&](std::string_view, double) { ++reports; }, nullptr};
  EXPECT_THROW(analyzePosition(project, *source, {}, counting), InputError);
  EXPECT_EQ(reports, 0) << "refused before any work";
  EXPECT_EQ(project.positions().size(), 1u);
}

TEST_F(Analyze, CancellingLeavesTheProjectUntouched) {
  const auto stack = writeSyntheticStack(dir_ / "p1.tif", 12);
  auto project = store::Project::create((dir_ / "e.budledger").string());
  auto source = io::openStack(stack.path);
  CancelToken cancel;
  Progress progress{[&](std::string_view stage, double f) {
                      if (stage == "registering" && f > 0.5) cancel.cancel();
                    },
                    &cancel};
  EXPECT_THROW(analyzePosition(project, *source, {}, progress), Cancelled);
  EXPECT_TRUE(project.positions().empty());
  EXPECT_TRUE(project.inputs().empty());
}

TEST_F(Analyze, ASuppliedLayoutReplacesTheDetectedOne) {
  const auto stack = writeSyntheticStack(dir_ / "p1.tif", 6);
  std::ofstream(dir_ / "t.csv") << "position,x,y\np1,100,120\np1,164,120\nother,5,5\n";
  const auto rows = traps::readTrapsCsv(dir_ / "t.csv");
  auto source = io::openStack(stack.path);
  AnalyzeOptions options;
  options.suppliedTraps = &rows;
  options.suppliedTrapsFile = dir_ / "t.csv";
  const PositionAnalysis a = analyzeFrames(*source, options, Progress{});
  ASSERT_EQ(a.layout.traps.size(), 2u);
  EXPECT_EQ(a.layout.source, traps::TrapLayout::Source::Supplied);
  EXPECT_EQ(a.layout.traps[1].centre, cv::Point2d(164, 120));
  EXPECT_GT(a.layout.crop.width, 30) << "crop sized from the detected lattice";
}

TEST_F(Analyze, NoLatticeAndNoLayoutIsAnInputError) {
  std::vector<cv::Mat> frames;
  cv::RNG rng(2);
  for (int t = 0; t < 4; ++t) {
    cv::Mat f(200, 240, CV_16U);
    rng.fill(f, cv::RNG::UNIFORM, 1000, 1100);
    frames.push_back(f);
  }
  budledger::testing::writeTiffStack(dir_ / "flat.tif", frames);
  auto source = io::openStack(dir_ / "flat.tif");
  try {
    analyzeFrames(*source, {}, Progress{});
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.file(), (dir_ / "flat.tif").string());
    EXPECT_NE(std::string(e.what()).find("--traps"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace budledger::pipeline
