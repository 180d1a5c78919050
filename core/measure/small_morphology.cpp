#include "core/measure/small_morphology.h"

#include <algorithm>
#include <limits>
#include <vector>

namespace budledger::measure {
namespace {

template <typename T, bool Max>
T pickOf(T a, T b) {
  return Max ? std::max(a, b) : std::min(a, b);
}

// dst = extreme (max for dilation, min for erosion) of src shifted by every offset,
// row by row so the inner loop is a plain vectorisable max or min. `dst` must not
// share data with `src`.
template <typename T, bool Max>
void extreme(const cv::Mat& src, cv::Mat& dst, const std::vector<cv::Point>& offsets) {
  dst.create(src.size(), src.type());
  const T start = Max ? std::numeric_limits<T>::lowest() : std::numeric_limits<T>::max();
  dst.setTo(cv::Scalar::all(static_cast<double>(start)));
  const int W = src.cols, H = src.rows;
  for (const cv::Point& o : offsets) {
    // Output pixel (x, y) reads (x + o.x, y + o.y) where that lies inside.
    const int y0 = std::max(0, -o.y), y1 = std::min(H, H - o.y);
    const int x0 = std::max(0, -o.x), x1 = std::min(W, W - o.x);
    for (int y = y0; y < y1; ++y) {
      const T* s = src.ptr<T>(y + o.y);
      T* d = dst.ptr<T>(y);
      for (int x = x0; x < x1; ++x) d[x] = pickOf<T, Max>(d[x], s[x + o.x]);
    }
  }
}

// The same for a full rectangle of half sizes `half`, as a row pass and a column pass:
// the extreme over the rectangle's part inside the image is the extreme over its rows
// of the extreme over each row's part inside.
template <typename T, bool Max>
void extremeRect(const cv::Mat& src, cv::Mat& dst, cv::Size half) {
  const int W = src.cols, H = src.rows;
  thread_local cv::Mat rows;
  rows.create(src.size(), src.type());
  for (int y = 0; y < H; ++y) {
    const T* s = src.ptr<T>(y);
    T* r = rows.ptr<T>(y);
    std::copy(s, s + W, r);
    for (int dx = 1; dx <= half.width; ++dx) {
      for (int x = 0; x + dx < W; ++x) r[x] = pickOf<T, Max>(r[x], s[x + dx]);
      for (int x = dx; x < W; ++x) r[x] = pickOf<T, Max>(r[x], s[x - dx]);
    }
  }
  dst.create(src.size(), src.type());
  for (int y = 0; y < H; ++y) {
    T* d = dst.ptr<T>(y);
    const T* r = rows.ptr<T>(y);
    std::copy(r, r + W, d);
    for (int dy = 1; dy <= half.height; ++dy) {
      if (y + dy < H) {
        const T* below = rows.ptr<T>(y + dy);
        for (int x = 0; x < W; ++x) d[x] = pickOf<T, Max>(d[x], below[x]);
      }
      if (y - dy >= 0) {
        const T* above = rows.ptr<T>(y - dy);
        for (int x = 0; x < W; ++x) d[x] = pickOf<T, Max>(d[x], above[x]);
      }
    }
  }
}

// The 3 x 3 cross (OpenCV's 3 x 3 ellipse), the segmentation's most used element, in one
// pass: each output row reads its own row and the rows above and below.
template <typename T, bool Max>
void extremeCross(const cv::Mat& src, cv::Mat& dst) {
  const int W = src.cols, H = src.rows;
  dst.create(src.size(), src.type());
  for (int y = 0; y < H; ++y) {
    const T* s = src.ptr<T>(y);
    const T* up = src.ptr<T>(y > 0 ? y - 1 : y);  // its own row stands in at the border
    const T* down = src.ptr<T>(y < H - 1 ? y + 1 : y);
    T* d = dst.ptr<T>(y);
    for (int x = 0; x < W; ++x) d[x] = pickOf<T, Max>(s[x], pickOf<T, Max>(up[x], down[x]));
    for (int x = 0; x + 1 < W; ++x) d[x] = pickOf<T, Max>(d[x], s[x + 1]);
    for (int x = W - 1; x > 0; --x) d[x] = pickOf<T, Max>(d[x], s[x - 1]);
  }
}

template <typename T, bool Max>
void run(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element) {
  if (element.isCross())
    extremeCross<T, Max>(src, dst);
  else if (const auto half = element.rectangle())
    extremeRect<T, Max>(src, dst, *half);
  else
    extreme<T, Max>(src, dst, element.offsets());
}

template <bool Max>
void apply(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element) {
  CV_Assert(src.data != dst.data || src.empty());
  if (src.depth() == CV_8U)
    run<uchar, Max>(src, dst, element);
  else if (src.depth() == CV_32F)
    run<float, Max>(src, dst, element);
  else
    CV_Error(cv::Error::StsUnsupportedFormat, "small morphology: CV_8U or CV_32F only");
}

}  // namespace

StructuringElement::StructuringElement(const cv::Mat& element) {
  const cv::Point centre(element.cols / 2, element.rows / 2);
  for (int y = 0; y < element.rows; ++y)
    for (int x = 0; x < element.cols; ++x)
      if (element.at<uchar>(y, x)) offsets_.push_back(cv::Point(x, y) - centre);
  if (element.cols % 2 && element.rows % 2 && offsets_.size() == element.total())
    rectangle_ = cv::Size(element.cols / 2, element.rows / 2);
  std::vector<cv::Point> cross = {{0, -1}, {-1, 0}, {0, 0}, {1, 0}, {0, 1}};
  cross_ = offsets_ == cross;
}

void smallDilate(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element) {
  apply<true>(src, dst, element);
}

void smallErode(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element) {
  apply<false>(src, dst, element);
}

void smallClose(cv::Mat& image, const StructuringElement& element, cv::Mat& scratch) {
  smallDilate(image, scratch, element);
  smallErode(scratch, image, element);
}

void smallOpen(cv::Mat& image, const StructuringElement& element, cv::Mat& scratch) {
  smallErode(image, scratch, element);
  smallDilate(scratch, image, element);
}

}  // namespace budledger::measure
