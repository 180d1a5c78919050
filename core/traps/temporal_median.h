#pragma once
// TemporalMedian: the per-pixel median of a few registered frames spread
// over the movie — the chip without the cells that come and go. Frames are
// brought into frame-0 coordinates with their drift. Memory is `capacity`
// frames, chosen by the caller independently of the movie's length.
#include <vector>

#include <opencv2/core.hpp>

namespace budledger::traps {

class TemporalMedian {
 public:
  TemporalMedian(cv::Size size, int capacity);
  bool full() const { return static_cast<int>(frames_.size()) >= capacity_; }
  int count() const { return static_cast<int>(frames_.size()); }
  // `drift`: where frame-0 content sits in this frame (see registration/drift.h).
  void add(const cv::Mat& frame, cv::Point2d drift);
  cv::Mat median() const;  // CV_32F; empty if nothing was added

 private:
  cv::Size size_;
  int capacity_;
  std::vector<cv::Mat> frames_;  // CV_16U, frame-0 coordinates
};

// `count` frame indices spread evenly over [0, frames), always including 0.
std::vector<int> spreadFrames(int frames, int count);

}  // namespace budledger::traps
