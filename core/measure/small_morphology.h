#pragma once
// Dilation, erosion, closing and opening for the small images of one crop
// (a few thousand pixels), where setting up OpenCV's filter engine costs more
// than the filtering itself. Any structuring element with its anchor at the
// centre; pixels outside the image never win (OpenCV's default border for
// morphology), so the results are exactly those of cv::dilate, cv::erode and
// cv::morphologyEx with the same element. CV_8U and CV_32F images.
#include <opencv2/core.hpp>

#include <optional>
#include <vector>

namespace budledger::measure {

// The element's set pixels as offsets from its centre.
class StructuringElement {
 public:
  explicit StructuringElement(const cv::Mat& element);
  const std::vector<cv::Point>& offsets() const { return offsets_; }
  // Half sizes when every pixel of the element is set (a rectangle is separable).
  std::optional<cv::Size> rectangle() const { return rectangle_; }
  // The plus-shaped 3 x 3 element (what OpenCV makes of a 3 x 3 ellipse).
  bool isCross() const { return cross_; }

 private:
  std::vector<cv::Point> offsets_;
  std::optional<cv::Size> rectangle_;
  bool cross_ = false;
};

void smallDilate(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element);
void smallErode(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element);
// In place; `scratch` is reused between calls.
void smallClose(cv::Mat& image, const StructuringElement& element, cv::Mat& scratch);
void smallOpen(cv::Mat& image, const StructuringElement& element, cv::Mat& scratch);

}  // namespace budledger::measure
