#pragma once
// Shared fixtures for the io tests: a scratch folder per test and small
// synthetic stacks written with libtiff.
#include <fmt/format.h>
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "tests/core/common/synthetic_scene.h"
#include "tests/core/common/tiff_writer.h"

namespace budledger::io::testsupport {

class ScratchDir : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = std::filesystem::temp_directory_path() /
           fmt::format("budledger_io_{}_{}_{}", info->test_suite_name(), info->name(), ::getpid());
    std::filesystem::remove_all(dir_);
    std::filesystem::create_directories(dir_);
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }
  std::filesystem::path file(const std::string& name) const { return dir_ / name; }
  std::filesystem::path dir_;
};

// `n` frames of a small trap scene with a little drift; bits 8 or 16.
inline std::vector<cv::Mat> sceneFrames(int n, int bits = 16, cv::Size size = {200, 150}) {
  budledger::testing::SceneOptions o;
  o.size = size;
  o.bits = bits;
  o.cellsInTraps = 4;
  o.freeCells = 2;
  const budledger::testing::SyntheticScene scene(o);
  std::vector<cv::Mat> out;
  for (int t = 0; t < n; ++t) out.push_back(scene.render({{0.7 * t, -0.4 * t}, 1.0, 0, t}));
  return out;
}

inline bool identical(const cv::Mat& a, const cv::Mat& b) {
  return a.size() == b.size() && a.type() == b.type() && cv::countNonZero(a != b) == 0;
}

}  // namespace budledger::io::testsupport
