#include "core/measure/background.h"

#include <gtest/gtest.h>

#include <cmath>
#include <opencv2/imgproc.hpp>

#include "render.h"

namespace budledger::measure {
namespace {

using testing::Blob;
using testing::Optics;
using testing::Scene;

cv::Mat shifted(const cv::Mat& img, cv::Point2d d) {
  const cv::Mat M = (cv::Mat_<double>(2, 3) << 1, 0, d.x, 0, 1, d.y);
  cv::Mat out;
  cv::warpAffine(img, out, M, img.size(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  return out;
}

// A found lattice is regular; fabricated traps sit a few tenths of a pixel off it (the
// simulator's variants show 0.2-0.3 px per trap, and a 0.6 px spread is within what a
// lattice fit leaves). Traps that are occupied in every sample take the lattice
// background, which must be carried onto their own posts: otherwise the posts' edges
// leave residuals of several noise SD that segmentation reads as small cells.
TEST(Background, LatticeBackgroundFollowsEachTrapsSubPixelOffset) {
  Scene scene;
  Optics optics;
  optics.halo = 0;
  const cv::Mat clean = testing::renderBackground(scene, optics);
  // Traps 0-7 are empty in the first half of the movie; 8-11 hold a mother throughout.
  const std::vector<cv::Point2d> jitter{{0.3, -0.2}, {-0.3, 0.2},  {0.2, 0.3},   {-0.2, -0.3},
                                        {0.1, 0.0},  {-0.1, 0.0},  {0.0, 0.1},   {0.0, -0.1},
                                        {0.45, 0.3}, {-0.4, 0.35}, {0.3, -0.45}, {-0.35, -0.4}};
  const int samplesPerTrap = 16;
  std::vector<std::vector<cv::Mat>> samples(jitter.size());
  std::uint64_t seed = 7;
  for (std::size_t t = 0; t < jitter.size(); ++t)
    for (int k = 0; k < samplesPerTrap; ++k) {
      Scene s = scene;
      if (t >= 8 || k >= samplesPerTrap / 2) {
        // Mothers differ in size, pose and bud from trap to trap and frame to frame.
        const auto ti = static_cast<int>(t);
        const double r = 6.0 + 0.3 * ((ti * 7 + k * 3) % 9);
        const double dx = ((ti * 5 + k) % 5) - 2.0, dy = ((ti + 2 * k) % 3) - 1.0;
        s.cells = {{scene.cupX + dx, scene.cupY + dy, r, r * 0.95}};
        if ((ti + k) % 3)
          s.cells.push_back(
              {scene.cupX + dx, scene.cupY + dy - r - 1.5 - 0.1 * k, 1.5 + 0.2 * k, 1.5 + 0.2 * k});
      }
      samples[t].push_back(normaliseCrop(shifted(testing::render(s, optics, seed++), jitter[t])));
    }
  BackgroundOptions o;
  o.threads = 1;
  o.cupRadiusPx = 9;
  const auto model = BackgroundModel::learn(samples, scene.cupX, scene.cupY, o);
  ASSERT_EQ(model.quality(), BackgroundModel::Quality::Good);

  const double noise = optics.noise / optics.level;  // on the normalised scale
  for (std::size_t t = 8; t < jitter.size(); ++t) {
    SCOPED_TRACE(t);
    ASSERT_EQ(model.source(t), BackgroundModel::Source::Lattice);
    // The lattice background is the median of traps jittered about zero, so it sits at
    // about zero itself and the trap's offset is its own jitter.
    EXPECT_NEAR(model.offset(t).x, jitter[t].x, 0.12);
    EXPECT_NEAR(model.offset(t).y, jitter[t].y, 0.12);
    // Away from the mother the background must match the trap's own empty look.
    cv::Mat truth = normaliseCrop(shifted(clean, jitter[t]));
    double worst = 0;
    for (int y = 4; y < truth.rows - 4; ++y)
      for (int x = 4; x < truth.cols - 4; ++x) {
        if (std::hypot(x - scene.cupX, y - scene.cupY) < 14) continue;
        worst = std::max<double>(
            worst, std::abs(model.background(t).at<float>(y, x) - truth.at<float>(y, x)));
      }
    // Without the carried offset the post edges leave about 6 noise SD here.
    EXPECT_LT(worst, 1.5 * noise);
  }
  for (std::size_t t = 0; t < 8; ++t) EXPECT_EQ(model.source(t), BackgroundModel::Source::Own);
}

}  // namespace
}  // namespace budledger::measure
