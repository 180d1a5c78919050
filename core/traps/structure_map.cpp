#include "core/traps/structure_map.h"

#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cmath>
#include <vector>

#include "core/register/features.h"

namespace budledger::traps {

namespace {

struct CellGrid {
  int na, nb;
  double det;
  const Lattice& lat;
  CellGrid(const Lattice& l)
      : na(std::max(4, static_cast<int>(std::ceil(cv::norm(l.a))))),
        nb(std::max(4, static_cast<int>(std::ceil(cv::norm(l.b))))),
        det(l.a.x * l.b.y - l.a.y * l.b.x),
        lat(l) {}
  int bins() const { return na * nb; }
  // Bins of pixels x0..x0+n-1 of row y; lattice coordinates are linear in x.
  void row(int x0, int y, int n, int* out) const {
    const double dx = x0 - lat.origin.x, dy = y - lat.origin.y;
    double u = (dx * lat.b.y - dy * lat.b.x) / det, v = (lat.a.x * dy - lat.a.y * dx) / det;
    const double du = lat.b.y / det, dv = -lat.a.y / det;
    for (int i = 0; i < n; ++i, u += du, v += dv) {
      const double fu = u - std::floor(u), fv = v - std::floor(v);
      out[i] = std::min(nb - 1, static_cast<int>(fv * nb)) * na +
               std::min(na - 1, static_cast<int>(fu * na));
    }
  }
};

}  // namespace

cv::Mat periodicAverage(const cv::Mat& values, const Lattice& lattice, cv::Rect fold) {
  CV_Assert(values.type() == CV_32F);
  fold = fold.empty() ? cv::Rect(0, 0, values.cols, values.rows)
                      : fold & cv::Rect(0, 0, values.cols, values.rows);
  const CellGrid grid(lattice);
  const int bins = grid.bins();
  // Counting sort of the fold region's values by unit-cell bin, then a median per bin.
  std::vector<int> binOf(static_cast<size_t>(fold.area()));
  std::vector<int> count(static_cast<size_t>(bins) + 1, 0);
  for (int y = 0; y < fold.height; ++y) {
    int* b = binOf.data() + static_cast<size_t>(y) * static_cast<size_t>(fold.width);
    grid.row(fold.x, fold.y + y, fold.width, b);
    for (int x = 0; x < fold.width; ++x) ++count[static_cast<size_t>(b[x]) + 1];
  }
  for (int i = 0; i < bins; ++i) count[static_cast<size_t>(i) + 1] += count[static_cast<size_t>(i)];
  std::vector<float> sorted(binOf.size());
  std::vector<int> fill(count.begin(), count.end() - 1);
  for (int y = 0; y < fold.height; ++y) {
    const float* row = values.ptr<float>(fold.y + y) + fold.x;
    for (int x = 0; x < fold.width; ++x) {
      const int b =
          binOf[static_cast<size_t>(y) * static_cast<size_t>(fold.width) + static_cast<size_t>(x)];
      sorted[static_cast<size_t>(fill[static_cast<size_t>(b)]++)] = row[x];
    }
  }
  std::vector<float> median(static_cast<size_t>(bins), 0.0f);
  for (int i = 0; i < bins; ++i) {
    auto* first = sorted.data() + count[static_cast<size_t>(i)];
    auto* last = sorted.data() + count[static_cast<size_t>(i) + 1];
    if (first == last) continue;
    auto* mid = first + (last - first) / 2;
    std::nth_element(first, mid, last);
    median[static_cast<size_t>(i)] = *mid;
  }
  cv::Mat out(values.size(), CV_32F);
  std::vector<int> rowBins(static_cast<size_t>(values.cols));
  for (int y = 0; y < values.rows; ++y) {
    grid.row(0, y, values.cols, rowBins.data());
    float* row = out.ptr<float>(y);
    for (int x = 0; x < values.cols; ++x)
      row[x] = median[static_cast<size_t>(rowBins[static_cast<size_t>(x)])];
  }
  return out;
}

cv::Mat structureMap(const cv::Mat& frame, const Lattice& lattice) {
  // A central region holds plenty of cells for the median and keeps this cheap.
  const int fw = std::min(frame.cols, 640), fh = std::min(frame.rows, 640);
  const cv::Rect fold((frame.cols - fw) / 2, (frame.rows - fh) / 2, fw, fh);
  cv::Mat features(frame.size(), CV_32F, cv::Scalar(0));
  cv::Mat part;
  registration::structureFeatures(frame(fold), part, {1.5, 0.0});
  part.copyTo(features(fold));
  cv::Mat periodic = periodicAverage(features, lattice, fold);
  // Scale: the typical (background) level maps to 0, strong edges to 1
  // (quantiles over the central region, which holds whole cells).
  const cv::Mat central = periodic(fold);
  std::vector<float> v;
  v.reserve(central.total());
  for (int y = 0; y < central.rows; y += 2)
    for (int x = 0; x < central.cols; x += 2) v.push_back(central.at<float>(y, x));
  const auto at = [&](double q) {
    auto it = v.begin() + static_cast<long>(q * static_cast<double>(v.size() - 1));
    std::nth_element(v.begin(), it, v.end());
    return *it;
  };
  const float lo = at(0.5), hi = at(0.98);
  cv::Mat weights;
  if (hi <= lo) return cv::Mat(frame.size(), CV_32F, cv::Scalar(1));
  periodic.convertTo(weights, CV_32F, 1.0 / (hi - lo), -lo / (hi - lo));
  cv::threshold(weights, weights, 1.0, 1.0, cv::THRESH_TRUNC);
  cv::threshold(weights, weights, 0.0, 0.0, cv::THRESH_TOZERO);
  // A little slack around the edges: drift moves them by a fraction of a pixel.
  cv::GaussianBlur(weights, weights, cv::Size(), 1.0);
  return weights;
}

cv::Mat persistence(const std::vector<cv::Mat>& features) {
  CV_Assert(!features.empty());
  const cv::Size size = features.front().size();
  const size_t n = features.size();
  cv::Mat out(size, CV_32F, cv::Scalar(1));
  if (n < 3) return out;
  const size_t low = n / 5;  // the 20% quantile
  std::vector<float> v(n);
  for (int y = 0; y < size.height; ++y) {
    float* o = out.ptr<float>(y);
    for (int x = 0; x < size.width; ++x) {
      for (size_t k = 0; k < n; ++k) v[k] = features[k].at<float>(y, x);
      std::nth_element(v.begin(), v.begin() + static_cast<long>(n / 2), v.end());
      const float median = v[n / 2];
      std::nth_element(v.begin(), v.begin() + static_cast<long>(low),
                       v.begin() + static_cast<long>(n / 2));
      o[x] = median > 0 ? std::clamp(v[low] / median, 0.0f, 1.0f) : 0.0f;
    }
  }
  // Full weight only where the low quantile keeps 90% of the median, none
  // below half; and none within the reach of the features' smoothing (2 px)
  // of anything transient, whose blurred rim still touches its neighbours.
  constexpr double kNone = 0.5, kFull = 0.9;
  out = (out - kNone) / (kFull - kNone);
  cv::threshold(out, out, 1.0, 1.0, cv::THRESH_TRUNC);
  cv::threshold(out, out, 0.0, 0.0, cv::THRESH_TOZERO);
  cv::erode(out, out, cv::getStructuringElement(cv::MORPH_ELLIPSE, cv::Size(5, 5)));
  return out;
}

}  // namespace budledger::traps
