#include "core/engine/engine_stage.h"

#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>

namespace budledger::engine {
namespace {

struct Fixture {
  io::StackInfo info;
  traps::TrapLayout layout;
  registration::DriftTrack drift;
  pipeline::PositionContext context;
  explicit Fixture(int frames) {
    info.frames = frames;
    layout.crop = cv::Rect(-24, -24, 48, 48);
    for (int i = 0; i < 4; ++i) {
      traps::Trap t;
      t.id = i;
      t.centre = {50.0 + 60 * i, 50.0};
      layout.traps.push_back(t);
    }
    drift.resize(static_cast<std::size_t>(frames));
    context.name =
        std::string(1, 'P');  // not a literal: GCC 12 warns falsely (-Wrestrict) on that assignment
    context.info = &info;
    context.layout = &layout;
    context.drift = &drift;
    context.intervalMin = 10;
    context.pixelUm = 0.25;
  }
};

void feed(EngineStage& stage, Fixture& f, bool registered) {
  stage.begin(f.context);
  std::vector<cv::Mat> crops(4, cv::Mat(48, 48, CV_16U, cv::Scalar(1000)));
  for (int t = 0; t < f.info.frames; ++t) {
    auto& d = f.drift[static_cast<std::size_t>(t)];
    d.frame = t;
    d.focus = 1.0;
    d.flags = registered || t == 0 ? registration::FrameDrift::kNone
                                   : registration::FrameDrift::kInterpolated;
    pipeline::FrameView view;
    view.frame = t;
    view.drift = &d;
    view.crops = &crops;
    stage.frame(view);
  }
}

TEST(EngineStage, FailedRegistrationIsReportedNotGuessed) {
  Fixture f(20);
  EngineStage stage(EngineOptions{}, measure::OccupancyModel::builtIn());
  feed(stage, f, false);
  const EngineResult r = stage.takeResult();
  EXPECT_TRUE(r.events.empty());
  EXPECT_NE(r.note.find("registration failed"), std::string::npos) << r.note;
  ASSERT_EQ(r.flags.size(), 4u);
  EXPECT_EQ(r.flags[0].reason, "registration-failed");
}

TEST(EngineStage, EmptyTrapsGiveNoEventsAndAreFlagged) {
  Fixture f(30);
  EngineStage stage(EngineOptions{}, measure::OccupancyModel::builtIn());
  feed(stage, f, true);
  const EngineResult r = stage.takeResult();
  EXPECT_TRUE(r.events.empty());
  EXPECT_EQ(r.measurements.size(), 4u * 30u);
  int neverOccupied = 0;
  for (const auto& fl : r.flags) neverOccupied += fl.reason == "never-occupied";
  EXPECT_EQ(neverOccupied, 4);
}

TEST(EngineStage, InformativeFramesNeedRegistrationAndFocus) {
  registration::FrameDrift d;
  d.focus = 1.0;
  EXPECT_TRUE(frameIsInformative(d));
  d.focus = 0.4;
  EXPECT_FALSE(frameIsInformative(d));
  d.focus = 1.0;
  d.flags = registration::FrameDrift::kInterpolated;
  EXPECT_FALSE(frameIsInformative(d));
}

}  // namespace
}  // namespace budledger::engine
