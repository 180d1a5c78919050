#include "core/measure/background_search.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <opencv2/imgproc.hpp>

#include "core/base/parallel_for.h"

namespace budledger::measure {
namespace {

constexpr double kSmoothSigma = 1.0;  // a fraction of a cell radius: noise averages out

double medianOf(std::vector<double> v) {
  if (v.empty()) return 0;
  auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

std::vector<float> pick(const cv::Mat& smoothed, const std::vector<cv::Point>& pixels) {
  std::vector<float> v;
  v.reserve(pixels.size());
  for (const auto& p : pixels) v.push_back(smoothed.at<float>(p));
  return v;
}

double meanAbs(const std::vector<float>& a, const std::vector<float>& b) {
  // Float sums over a few hundred pixels: plenty of precision, and they vectorise.
  float s = 0;
  const std::size_t n = std::min(a.size(), b.size());
  const float* pa = a.data();
  const float* pb = b.data();
  for (std::size_t i = 0; i < n; ++i) s += std::abs(pa[i] - pb[i]);
  return n ? static_cast<double>(s) / static_cast<double>(n) : 0.0;
}

// Threshold between empty and occupied samples on their k-NN distances; -inf when the
// distances show no empty mode.
double emptyLimit(const std::vector<double>& knn, double floor, const BackgroundOptions& o) {
  std::vector<double> v;
  for (double d : knn)
    if (std::isfinite(d) && d > 0) v.push_back(std::log(d));
  const double none = -std::numeric_limits<double>::infinity();
  if (v.size() < 4) return none;
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  std::vector<double> prefix(n + 1, 0.0);
  for (std::size_t i = 0; i < n; ++i) prefix[i + 1] = prefix[i] + v[i];
  double best = -1;
  std::size_t split = 0;
  for (std::size_t i = 1; i < n; ++i) {  // low class v[0..i-1]
    const double w0 = static_cast<double>(i) / n, w1 = 1 - w0;
    const double m0 = prefix[i] / i, m1 = (prefix[n] - prefix[i]) / (n - i);
    const double between = w0 * w1 * (m0 - m1) * (m0 - m1);
    if (between > best) {
      best = between;
      split = i;
    }
  }
  const double lowMean = prefix[split] / split;
  const double highMean = (prefix[n] - prefix[split]) / (n - split);
  // The modes' geometric means must differ by kModesApart. Empty samples sit at the
  // noise floor; occupied ones above it by what cells add, which in a noisy movie is
  // little: on one held-out hard position (camera noise 3x the usual) the two modes
  // were 0.023 and 0.047, just under a factor 2, and with no empty trap found the
  // outline sign came out wrong and nothing was found (separation F1 0.002; 0.76 at
  // 1.6). Otsu's split of a single mode puts the halves' means about 1.6 of its log SD
  // apart, so a single mode passes only if its log SD exceeds 0.3 and its lower half
  // also lies near the noise floor; on the 20 validation sets the change altered no
  // choice of empties.
  constexpr double kModesApart = 1.6;
  const bool nearFloor = lowMean <= std::log(o.noiseFactor * floor);
  const bool apart = highMean - lowMean >= std::log(kModesApart);
  // Otherwise no sample is called empty. When every sample is (an unloaded chip), the
  // lattice median of all of them is the empty trap anyway.
  if (!nearFloor || !apart) return none;
  return std::exp(0.5 * (v[split - 1] + v[split]));
}

// The translation d (pixels) that best carries the lattice background onto a trap's own
// look: Lucas-Kanade (Lucas & Kanade 1981) on the trap's per-pixel median over its
// samples. A found lattice is regular while fabricated traps sit a few tenths of a pixel
// off it, and a lattice background that misses a trap's posts by that much leaves
// residuals along their edges that read as small cells beside the mother. Cells in the
// median (a mother seated throughout) are outliers, trimmed at 3 robust SD of the
// residual each round; a shift the posts cannot pin down (too little structure) is zero.
cv::Point2d latticeOffset(const cv::Mat& lattice, const cv::Mat& own) {
  cv::Mat I, J;
  cv::GaussianBlur(lattice, I, cv::Size(0, 0), 1.0);
  cv::GaussianBlur(own, J, cv::Size(0, 0), 1.0);
  cv::Point2d d(0, 0);
  const int margin = 3;  // warped borders are replicated, not information
  std::vector<double> absR;
  for (int round = 0; round < 6; ++round) {
    cv::Mat W, gx, gy;
    const cv::Mat M = (cv::Mat_<double>(2, 3) << 1, 0, d.x, 0, 1, d.y);
    cv::warpAffine(I, W, M, I.size(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
    cv::Sobel(W, gx, CV_32F, 1, 0, 3, 1.0 / 8);
    cv::Sobel(W, gy, CV_32F, 0, 1, 3, 1.0 / 8);
    absR.clear();
    for (int y = margin; y < I.rows - margin; ++y) {
      const float* j = J.ptr<float>(y);
      const float* w = W.ptr<float>(y);
      for (int x = margin; x < I.cols - margin; ++x) absR.push_back(std::abs(j[x] - w[x]));
    }
    const double cut = 3 * 1.4826 * std::max(1e-9, medianOf(absR));
    double a = 0, b = 0, c = 0, u = 0, v = 0;
    for (int y = margin; y < I.rows - margin; ++y) {
      const float* j = J.ptr<float>(y);
      const float* w = W.ptr<float>(y);
      const float* gxr = gx.ptr<float>(y);
      const float* gyr = gy.ptr<float>(y);
      for (int x = margin; x < I.cols - margin; ++x) {
        const double r = j[x] - w[x];
        if (std::abs(r) > cut) continue;
        const double px = gxr[x], py = gyr[x];
        a += px * px;
        b += px * py;
        c += py * py;
        u += px * r;
        v += py * r;
      }
    }
    const double det = a * c - b * b;
    if (!(det > 1e-12 * (a + c) * (a + c)) || a + c <= 0) return {0, 0};
    // J ~ W - grad(W) . delta, so delta = -(G'G)^-1 G'r.
    const cv::Point2d step(-(c * u - b * v) / det, -(a * v - b * u) / det);
    d += step;
    if (std::hypot(d.x, d.y) > 3) return {0, 0};  // not a sub-pixel misfit: leave it alone
    if (std::hypot(step.x, step.y) < 0.01) break;
  }
  return d;
}

}  // namespace

int countSamples(const std::vector<std::vector<int>>& empties) {
  int n = 0;
  for (const auto& e : empties) n += static_cast<int>(e.size());
  return n;
}

BackgroundSearch::BackgroundSearch(const std::vector<std::vector<cv::Mat>>& samples,
                                   const BackgroundOptions& options)
    : samples_(samples), options_(options) {
  for (const auto& t : samples)
    if (!t.empty()) size_ = t.front().size();
  if (size_.area() == 0) return;
  smoothed_.resize(samples.size());
  parallelFor(samples.size(), options.threads, [&](std::size_t t) {
    for (const auto& s : samples[t]) {
      smoothed_[t].emplace_back();
      cv::GaussianBlur(s, smoothed_[t].back(), cv::Size(0, 0), kSmoothSigma);
    }
  });
  // Noise floor: consecutive samples of a trap differ only by noise in the crop border
  // (medium), apart from the odd passing cell, hence the median.
  const int width = 4;
  std::vector<cv::Point> border;
  for (int y = 0; y < size_.height; ++y)
    for (int x = 0; x < size_.width; ++x) {
      const bool inner = size_.width > 2 * width && size_.height > 2 * width && x >= width &&
                         y >= width && x < size_.width - width && y < size_.height - width;
      if (!inner) border.push_back({x, y});
    }
  std::vector<double> floors;
  for (const auto& t : smoothed_)
    for (std::size_t k = 1; k < t.size(); ++k)
      floors.push_back(meanAbs(pick(t[k - 1], border), pick(t[k], border)));
  floor_ = std::max(1e-9, medianOf(floors));
}

std::vector<std::vector<int>> BackgroundSearch::empties(double cupX, double cupY,
                                                         double radiusPx) const {
  const std::size_t traps = samples_.size();
  std::vector<std::vector<int>> out(traps);
  if (size_.area() == 0) return out;
  std::vector<cv::Point> disk;
  const double r = radiusPx > 0 ? radiusPx : options_.cupRadiusPx;
  const double r2 = r * r;
  for (int y = 0; y < size_.height; ++y)
    for (int x = 0; x < size_.width; ++x) {
      const double dx = x - cupX, dy = y - cupY;
      if (dx * dx + dy * dy <= r2) disk.push_back({x, y});
    }
  // Each sample's k-th nearest distance to samples of other traps. The disks are held
  // pixel-major ([pixel][sample]) so that one sample's distances to all others are
  // summed side by side, each in the same pixel order as meanAbs() would: the sums
  // vectorise across samples and every distance stays exactly what meanAbs() gives.
  std::vector<std::pair<std::size_t, int>> all;  // trap, sample index
  for (std::size_t t = 0; t < traps; ++t)
    for (std::size_t k = 0; k < smoothed_[t].size(); ++k) all.emplace_back(t, static_cast<int>(k));
  const std::size_t n = all.size(), P = disk.size();
  std::vector<float> disks(P * n);
  for (std::size_t j = 0; j < n; ++j) {
    const cv::Mat& m = smoothed_[all[j].first][static_cast<std::size_t>(all[j].second)];
    for (std::size_t p = 0; p < P; ++p) disks[p * n + j] = m.at<float>(disk[p]);
  }
  // A distance is symmetric (|a - b| = |b - a|, summed in the same order), so row i sums
  // only j > i and lends each sum to row j.
  std::vector<float> sums(n * n, 0.f);
  parallelFor(n, options_.threads, [&](std::size_t i) {
    float* s = sums.data() + i * n;
    for (std::size_t p = 0; p < P; ++p) {
      const float a = disks[p * n + i];
      const float* row = disks.data() + p * n;
      for (std::size_t j = i + 1; j < n; ++j) s[j] += std::abs(a - row[j]);
    }
  });
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t j = i + 1; j < n; ++j) sums[j * n + i] = sums[i * n + j];
  std::vector<double> knn(n, std::numeric_limits<double>::infinity());
  const auto k = static_cast<std::size_t>(options_.neighbours);
  parallelFor(n, options_.threads, [&](std::size_t i) {
    const float* s = sums.data() + i * n;
    std::vector<double> d;
    d.reserve(n);
    for (std::size_t j = 0; j < n; ++j)
      if (all[j].first != all[i].first)
        d.push_back(P ? static_cast<double>(s[j]) / static_cast<double>(P) : 0.0);
    const std::size_t kk = std::min(k, d.size());
    if (kk == 0) return;
    std::nth_element(d.begin(), d.begin() + static_cast<std::ptrdiff_t>(kk - 1), d.end());
    knn[i] = d[kk - 1];
  });

  // Empty samples form the low mode of log k-NN distance; occupied ones sit well above.
  // The split is Otsu's threshold (Otsu 1979) on the log distances; it is accepted only
  // when the low mode is near the noise floor and clearly apart from the rest.
  const double limit = emptyLimit(knn, floor_, options_);
  for (std::size_t i = 0; i < n; ++i)
    if (knn[i] <= limit) out[all[i].first].push_back(all[i].second);
  return out;
}

BackgroundModel BackgroundSearch::model(std::vector<std::vector<int>> empties) const {
  BackgroundModel m;
  const std::size_t traps = samples_.size();
  empties.resize(traps);
  m.backgrounds_.resize(traps);
  m.sources_.assign(traps, BackgroundModel::Source::Fallback);
  m.offsets_.assign(traps, {0, 0});
  if (size_.area() == 0) {
    m.empties_.assign(traps, {});
    m.quality_ = BackgroundModel::Quality::NoEmptyTrap;
    return m;
  }
  m.empties_ = std::move(empties);
  m.floor_ = floor_;
  std::vector<const cv::Mat*> selected;
  for (std::size_t t = 0; t < traps; ++t)
    for (int k : m.empties_[t]) selected.push_back(&samples_[t][static_cast<std::size_t>(k)]);
  m.emptySamples_ = static_cast<int>(selected.size());
  cv::Mat lattice;
  if (static_cast<int>(selected.size()) >= kMinEmpty) {
    lattice = pixelMedian(selected);
  } else {
    m.quality_ = BackgroundModel::Quality::NoEmptyTrap;
    std::vector<const cv::Mat*> every;
    for (const auto& t : samples_)
      for (const auto& s : t) every.push_back(&s);
    lattice = pixelMedian(every);
  }
  // Each trap's background depends on the lattice and its own samples alone.
  parallelFor(traps, options_.threads, [&](std::size_t t) {
    if (static_cast<int>(m.empties_[t].size()) >= options_.minOwnEmpty) {
      std::vector<const cv::Mat*> own;
      for (int k : m.empties_[t]) own.push_back(&samples_[t][static_cast<std::size_t>(k)]);
      m.backgrounds_[t] = pixelMedian(own);
      m.sources_[t] = BackgroundModel::Source::Own;
      return;
    }
    m.backgrounds_[t] = lattice;
    if (!samples_[t].empty()) {
      std::vector<const cv::Mat*> own;
      for (const auto& s : samples_[t]) own.push_back(&s);
      const cv::Point2d d = latticeOffset(lattice, pixelMedian(own));
      m.offsets_[t] = d;
      if (d != cv::Point2d(0, 0)) {
        // Into a fresh image: the traps without a background of their own share the
        // lattice's pixels.
        const cv::Mat M = (cv::Mat_<double>(2, 3) << 1, 0, d.x, 0, 1, d.y);
        cv::Mat carried;
        cv::warpAffine(lattice, carried, M, lattice.size(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
        m.backgrounds_[t] = carried;
      }
    }
    m.sources_[t] = m.quality_ == BackgroundModel::Quality::Good
                        ? BackgroundModel::Source::Lattice
                        : BackgroundModel::Source::Fallback;
  });
  return m;
}

}  // namespace budledger::measure
