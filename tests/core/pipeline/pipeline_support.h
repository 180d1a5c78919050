#pragma once
// A scratch folder and a small synthetic OME-TIFF stack for pipeline tests.
#include <fmt/format.h>
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <vector>

#include "tests/core/common/synthetic_scene.h"
#include "tests/core/common/tiff_writer.h"

namespace budledger::pipeline::testsupport {

class Scratch : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ =
        std::filesystem::temp_directory_path() /
        fmt::format("budledger_pipe_{}_{}_{}", info->test_suite_name(), info->name(), ::getpid());
    std::filesystem::remove_all(dir_);
    std::filesystem::create_directories(dir_);
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }
  std::filesystem::path dir_;
};

struct SyntheticStack {
  std::filesystem::path path;
  budledger::testing::SceneOptions options;
  std::vector<cv::Point2d> drift;
};

// A drifting stack with a jump at frame `frames / 2` and one blurred frame.
inline SyntheticStack writeSyntheticStack(const std::filesystem::path& path, int frames,
                                          cv::Size size = {448, 384}) {
  SyntheticStack s;
  s.path = path;
  s.options.size = size;
  s.drift = budledger::testing::makeDrift(frames, 5.0, 8, {{frames / 2, {11, -7}}});
  const budledger::testing::SyntheticScene scene(s.options);
  std::vector<cv::Mat> images;
  for (int t = 0; t < frames; ++t)
    images.push_back(scene.render(
        {s.drift[static_cast<size_t>(t)], 1.0 + 0.05 * (t % 3), t == 3 ? 3.0 : 0.0, t}));
  budledger::testing::TiffWriteOptions w;
  w.description = budledger::testing::omeXml(size.width, size.height, frames, 16, 10.0, 0.25);
  budledger::testing::writeTiffStack(path, images, w);
  return s;
}

}  // namespace budledger::pipeline::testsupport
