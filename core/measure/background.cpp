#include "core/measure/background.h"

#include "core/measure/background_search.h"

#include <algorithm>
#include <vector>

namespace budledger::measure {

cv::Mat normaliseCrop(const cv::Mat& crop) {
  cv::Mat f;
  crop.convertTo(f, CV_32F);
  // Every other pixel of the 3-pixel border: plenty for a median, at a fraction of the cost.
  std::vector<float> v;
  v.reserve(static_cast<std::size_t>(3 * (f.rows + f.cols)));
  for (int y = 0; y < f.rows; ++y) {
    const float* row = f.ptr<float>(y);
    if (y < 3 || y >= f.rows - 3) {
      for (int x = y % 2; x < f.cols; x += 2) v.push_back(row[x]);
    } else if (y % 2 == 0) {
      for (int x = 0; x < std::min(3, f.cols); ++x) v.push_back(row[x]);
      for (int x = std::max(0, f.cols - 3); x < f.cols; ++x) v.push_back(row[x]);
    }
  }
  if (v.empty()) return f;
  auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  if (*mid > 0) f *= 1.0 / *mid;
  return f;
}

cv::Mat pixelMedian(const std::vector<const cv::Mat*>& images) {
  if (images.empty()) return {};
  const cv::Mat& first = *images.front();
  cv::Mat out(first.size(), CV_32F);
  const std::size_t n = images.size();
  std::vector<float> v(n);
  std::vector<const float*> rows(n);
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(n / 2);
  for (int y = 0; y < first.rows; ++y) {
    for (std::size_t i = 0; i < n; ++i) rows[i] = images[i]->ptr<float>(y);
    float* o = out.ptr<float>(y);
    for (int x = 0; x < first.cols; ++x) {
      for (std::size_t i = 0; i < n; ++i) v[i] = rows[i][x];
      std::nth_element(v.begin(), mid, v.end());
      o[x] = *mid;
    }
  }
  return out;
}

BackgroundModel BackgroundModel::learn(const std::vector<std::vector<cv::Mat>>& samples,
                                       double cupX, double cupY, const BackgroundOptions& o) {
  const BackgroundSearch search(samples, o);
  return search.model(search.empties(cupX, cupY));
}

}  // namespace budledger::measure
