#include "core/measure/small_morphology.h"

#include <gtest/gtest.h>

#include <opencv2/imgproc.hpp>

namespace budledger::measure {
namespace {

// The segmentation swapped OpenCV's morphology for these on the promise that nothing
// changes, so they are held to OpenCV's results on random images of crop-like sizes,
// objects touching the border included (that is where border handling shows).
cv::Mat randomMask(cv::Size size, std::uint64_t seed, double share) {
  cv::RNG rng(seed);
  cv::Mat noise(size, CV_32F);
  rng.fill(noise, cv::RNG::UNIFORM, 0.0, 1.0);
  cv::GaussianBlur(noise, noise, cv::Size(0, 0), 1.5);  // blobs, not salt and pepper
  double lo = 0, hi = 0;
  cv::minMaxLoc(noise, &lo, &hi);
  return noise > lo + (1 - share) * (hi - lo);
}

TEST(SmallMorphology, MatchesOpenCvOnMasks) {
  const std::vector<cv::Mat> elements = {cv::getStructuringElement(cv::MORPH_ELLIPSE, {3, 3}),
                                         cv::getStructuringElement(cv::MORPH_ELLIPSE, {5, 5}),
                                         cv::getStructuringElement(cv::MORPH_ELLIPSE, {7, 7}),
                                         cv::getStructuringElement(cv::MORPH_RECT, {5, 5})};
  const std::vector<cv::Size> sizes = {{1, 1}, {2, 5}, {9, 4}, {37, 23}, {81, 81}};
  std::uint64_t seed = 1;
  for (const auto& k : elements) {
    const StructuringElement element(k);
    for (const auto size : sizes)
      for (double share : {0.2, 0.5, 0.8}) {
        const cv::Mat mask = randomMask(size, seed++, share);
        cv::Mat ours, theirs, scratch;
        smallDilate(mask, ours, element);
        cv::dilate(mask, theirs, k);
        EXPECT_EQ(cv::countNonZero(ours != theirs), 0) << "dilate " << size;
        smallErode(mask, ours, element);
        cv::erode(mask, theirs, k);
        EXPECT_EQ(cv::countNonZero(ours != theirs), 0) << "erode " << size;
        ours = mask.clone();
        smallClose(ours, element, scratch);
        cv::morphologyEx(mask, theirs, cv::MORPH_CLOSE, k);
        EXPECT_EQ(cv::countNonZero(ours != theirs), 0) << "close " << size;
        ours = mask.clone();
        smallOpen(ours, element, scratch);
        cv::morphologyEx(mask, theirs, cv::MORPH_OPEN, k);
        EXPECT_EQ(cv::countNonZero(ours != theirs), 0) << "open " << size;
      }
  }
}

TEST(SmallMorphology, MatchesOpenCvOnFloatImages) {
  const cv::Mat k = cv::getStructuringElement(cv::MORPH_RECT, {5, 5});
  const StructuringElement element(k);
  cv::RNG rng(7);
  for (const cv::Size size : {cv::Size(3, 3), cv::Size(40, 17), cv::Size(81, 81)}) {
    cv::Mat image(size, CV_32F);
    rng.fill(image, cv::RNG::UNIFORM, -5.0, 5.0);
    cv::Mat ours, theirs;
    smallDilate(image, ours, element);
    cv::dilate(image, theirs, k);
    EXPECT_EQ(cv::countNonZero(ours != theirs), 0) << size;
  }
}

TEST(SmallMorphology, AnElementIsItsSetPixels) {
  const StructuringElement cross(cv::getStructuringElement(cv::MORPH_ELLIPSE, {3, 3}));
  EXPECT_EQ(cross.offsets().size(), 5u);  // the 3x3 "ellipse" is a cross
  EXPECT_TRUE(cross.isCross());
  EXPECT_FALSE(cross.rectangle());
  const StructuringElement square(cv::getStructuringElement(cv::MORPH_RECT, {5, 5}));
  EXPECT_EQ(square.offsets().size(), 25u);
  EXPECT_EQ(square.rectangle(), cv::Size(2, 2));
  EXPECT_FALSE(square.isCross());
}

}  // namespace
}  // namespace budledger::measure
