#include "core/measure/small_morphology.h"

#include <algorithm>
#include <limits>
#include <vector>

namespace budledger::measure {
namespace {

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
      const T* s = src.ptr<T>(y + o.y) + o.x;
      T* d = dst.ptr<T>(y);
      for (int x = x0; x < x1; ++x) d[x] = Max ? std::max(d[x], s[x]) : std::min(d[x], s[x]);
    }
  }
}

template <bool Max>
void apply(const cv::Mat& src, cv::Mat& dst, const StructuringElement& element) {
  CV_Assert(src.data != dst.data || src.empty());
  if (src.depth() == CV_8U)
    extreme<uchar, Max>(src, dst, element.offsets());
  else if (src.depth() == CV_32F)
    extreme<float, Max>(src, dst, element.offsets());
  else
    CV_Error(cv::Error::StsUnsupportedFormat, "small morphology: CV_8U or CV_32F only");
}

}  // namespace

StructuringElement::StructuringElement(const cv::Mat& element) {
  const cv::Point centre(element.cols / 2, element.rows / 2);
  for (int y = 0; y < element.rows; ++y)
    for (int x = 0; x < element.cols; ++x)
      if (element.at<uchar>(y, x)) offsets_.push_back(cv::Point(x, y) - centre);
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
