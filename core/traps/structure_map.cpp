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

}  // namespace budledger::traps
