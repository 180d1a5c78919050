#include "core/traps/temporal_median.h"

#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cmath>

namespace budledger::traps {

TemporalMedian::TemporalMedian(cv::Size size, int capacity)
    : size_(size), capacity_(std::max(1, capacity)) {}

namespace {

// out(p) = frame(p + shift) by bilinear interpolation with the frame's border
// repeated; one fractional weight set serves every pixel of a translation.
template <typename T>
void translate(const cv::Mat& frame, cv::Point2d shift, cv::Mat& out) {
  const int w = frame.cols, h = frame.rows;
  const int ix = static_cast<int>(std::floor(shift.x)), iy = static_cast<int>(std::floor(shift.y));
  const float fx = static_cast<float>(shift.x - ix), fy = static_cast<float>(shift.y - iy);
  const float w00 = (1 - fx) * (1 - fy), w01 = fx * (1 - fy), w10 = (1 - fx) * fy, w11 = fx * fy;
  out.create(h, w, CV_16U);
  std::vector<int> col0(static_cast<size_t>(w)), col1(static_cast<size_t>(w));
  for (int x = 0; x < w; ++x) {
    col0[static_cast<size_t>(x)] = std::clamp(x + ix, 0, w - 1);
    col1[static_cast<size_t>(x)] = std::clamp(x + ix + 1, 0, w - 1);
  }
  const int xs = std::clamp(-ix, 0, w), xe = std::clamp(w - 1 - ix, xs, w);  // no clamping inside
  for (int y = 0; y < h; ++y) {
    const T* a = frame.ptr<T>(std::clamp(y + iy, 0, h - 1));
    const T* b = frame.ptr<T>(std::clamp(y + iy + 1, 0, h - 1));
    auto* o = out.ptr<std::uint16_t>(y);
    auto px = [&](int x, int c0, int c1) {
      o[x] =
          static_cast<std::uint16_t>(w00 * a[c0] + w01 * a[c1] + w10 * b[c0] + w11 * b[c1] + 0.5f);
    };
    for (int x = 0; x < xs; ++x) px(x, col0[static_cast<size_t>(x)], col1[static_cast<size_t>(x)]);
    for (int x = xs; x < xe; ++x) px(x, x + ix, x + ix + 1);
    for (int x = xe; x < w; ++x) px(x, col0[static_cast<size_t>(x)], col1[static_cast<size_t>(x)]);
  }
}

// Comparators of Batcher's odd-even merge sort for n inputs (a sorting
// network: the same compare-exchange steps sort any input, so they can be
// applied to whole rows at once).
std::vector<std::pair<int, int>> sortingNetwork(int n) {
  std::vector<std::pair<int, int>> out;
  int size = 1;
  while (size < n) size <<= 1;
  for (int p = 1; p < size; p <<= 1)
    for (int k = p; k >= 1; k >>= 1)
      for (int j = k % p; j + k < size; j += 2 * k)
        for (int i = 0; i < k; ++i)
          if ((i + j) / (2 * p) == (i + j + k) / (2 * p) && i + j + k < n)
            out.emplace_back(i + j, i + j + k);
  return out;
}

}  // namespace

void TemporalMedian::add(const cv::Mat& frame, cv::Point2d drift) {
  if (full()) return;
  CV_Assert(frame.size() == size_);
  cv::Mat out;
  if (frame.depth() == CV_16U)
    translate<std::uint16_t>(frame, drift, out);
  else
    translate<std::uint8_t>(frame, drift, out);
  frames_.push_back(std::move(out));
}

cv::Mat TemporalMedian::median() const {
  if (frames_.empty()) return {};
  const int n = static_cast<int>(frames_.size());
  const auto network = sortingNetwork(n);
  cv::Mat out(size_, CV_32F);
  const int w = size_.width;
  std::vector<std::uint16_t> rows(static_cast<size_t>(n) * static_cast<size_t>(w));
  for (int y = 0; y < size_.height; ++y) {
    for (int k = 0; k < n; ++k)
      std::copy_n(frames_[static_cast<size_t>(k)].ptr<std::uint16_t>(y), w,
                  rows.data() + static_cast<size_t>(k) * static_cast<size_t>(w));
    for (const auto& [i, j] : network) {
      std::uint16_t* a = rows.data() + static_cast<size_t>(i) * static_cast<size_t>(w);
      std::uint16_t* b = rows.data() + static_cast<size_t>(j) * static_cast<size_t>(w);
      for (int x = 0; x < w; ++x) {
        const std::uint16_t lo = std::min(a[x], b[x]), hi = std::max(a[x], b[x]);
        a[x] = lo;
        b[x] = hi;
      }
    }
    const std::uint16_t* mid = rows.data() + static_cast<size_t>(n / 2) * static_cast<size_t>(w);
    float* o = out.ptr<float>(y);
    for (int x = 0; x < w; ++x) o[x] = mid[x];
  }
  return out;
}

std::vector<int> spreadFrames(int frames, int count) {
  std::vector<int> out;
  count = std::clamp(count, 1, std::max(frames, 1));
  for (int k = 0; k < count; ++k) {
    const int f =
        count == 1
            ? 0
            : static_cast<int>(std::lround(static_cast<double>(k) * (frames - 1) / (count - 1)));
    if (out.empty() || out.back() != f) out.push_back(f);
  }
  return out;
}

}  // namespace budledger::traps
