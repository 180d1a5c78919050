// The extension point: a FrameStage sees every frame's registered crops in
// order and commits in the position's transaction.
#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>
#include <stdexcept>

#include "core/io/frame_source.h"
#include "core/pipeline/analyze.h"
#include "tests/core/pipeline/pipeline_support.h"

namespace budledger::pipeline {
namespace {

class RecordingStage : public FrameStage {
 public:
  bool failCommit = false;
  int begun = 0, frames = 0, lastFrame = -1;
  size_t trapCount = 0;
  cv::Size cropSize;
  cv::Mat firstCrop;
  double worstAlignment = 1;

  std::string_view name() const override { return "recording"; }
  void begin(const PositionContext& ctx) override {
    ++begun;
    trapCount = ctx.layout->traps.size();
    EXPECT_EQ(ctx.drift->size(), static_cast<size_t>(ctx.info->frames));
  }
  void frame(const FrameView& v) override {
    EXPECT_EQ(v.frame, lastFrame + 1);
    lastFrame = v.frame;
    ++frames;
    ASSERT_EQ(v.crops->size(), trapCount);
    cropSize = v.crops->front().size();
    // The same trap, registered: its crop matches frame 0's in place
    // (normalised correlation, so flicker and shading do not count).
    const cv::Mat& crop = (*v.crops)[trapCount / 2];
    if (v.frame == 0) crop.convertTo(firstCrop, CV_32F);
    cv::Mat now, score;
    crop.convertTo(now, CV_32F);
    cv::matchTemplate(now, firstCrop, score, cv::TM_CCOEFF_NORMED);
    if (v.drift->confidence >= 0.8)  // not the blurred frame
      worstAlignment = std::min(worstAlignment, static_cast<double>(score.at<float>(0, 0)));
  }
  void commit(store::Project& project, const PositionContext& ctx) override {
    EXPECT_GT(ctx.positionId, 0);
    project.setMeta("recording.frames", std::to_string(frames));
    if (failCommit) throw std::runtime_error("stage failed");
  }
};

class Stages : public testsupport::Scratch {};

TEST_F(Stages, SeeEveryFrameInOrderAndCommitWithThePosition) {
  const auto stack = testsupport::writeSyntheticStack(dir_ / "p.tif", 9);
  auto project = store::Project::create((dir_ / "e.budledger").string());
  auto source = io::openStack(stack.path);
  RecordingStage stage;
  FrameStage* stages[] = {&stage};
  const auto a = analyzePosition(project, *source, {}, Progress{}, stages);
  EXPECT_EQ(stage.begun, 1);
  EXPECT_EQ(stage.frames, 9);
  EXPECT_EQ(stage.cropSize, a.layout.crop.size());
  EXPECT_GT(stage.worstAlignment, 0.8);
  EXPECT_EQ(project.meta("recording.frames"), "9");
}

TEST_F(Stages, AFailingStageWritesNothingAtAll) {
  const auto stack = testsupport::writeSyntheticStack(dir_ / "p.tif", 5);
  auto project = store::Project::create((dir_ / "e.budledger").string());
  auto source = io::openStack(stack.path);
  RecordingStage stage;
  stage.failCommit = true;
  FrameStage* stages[] = {&stage};
  EXPECT_THROW(analyzePosition(project, *source, {}, Progress{}, stages), std::runtime_error);
  EXPECT_TRUE(project.positions().empty());
  EXPECT_FALSE(project.meta("recording.frames").has_value());
  EXPECT_TRUE(project.traps().empty());
}

}  // namespace
}  // namespace budledger::pipeline
