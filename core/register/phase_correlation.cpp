#include "core/register/phase_correlation.h"

#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cmath>

namespace budledger::registration {

void PhaseCorrelator::prepare(const cv::Mat& features, const cv::Mat& weights, cv::Mat& spectrum) {
  scratch_.create(padded_, CV_32F);
  scratch_.setTo(0);
  cv::Mat roi = scratch_(cv::Rect(cv::Point(), size_));
  cv::multiply(features, window_, roi);
  if (!weights.empty()) cv::multiply(roi, weights, roi);
  cv::dft(scratch_, spectrum);
}

namespace {
// Visits every complex value of a CCS-packed spectrum as (re, im) pointers
// with its frequency (fx, fy); real-only entries get im = nullptr.
template <typename F>
void forEachCcs(cv::Mat& s, F&& f) {
  const int rows = s.rows, cols = s.cols;
  auto freqY = [rows](int y) { return y <= rows / 2 ? y : y - rows; };
  // Columns 0 and (for even width) cols-1 pack a complex column down the rows.
  const int packedCols = cols % 2 == 0 ? 2 : 1;
  for (int c = 0; c < packedCols; ++c) {
    const int col = c == 0 ? 0 : cols - 1;
    const int fx = c == 0 ? 0 : cols / 2;
    f(&s.at<float>(0, col), nullptr, fx, 0);
    for (int y = 1; y + 1 < rows; y += 2)
      f(&s.at<float>(y, col), &s.at<float>(y + 1, col), fx, (y + 1) / 2);
    if (rows % 2 == 0) f(&s.at<float>(rows - 1, col), nullptr, fx, rows / 2);
  }
  const int end = cols % 2 == 0 ? cols - 1 : cols;  // one past the last paired column
  for (int y = 0; y < rows; ++y) {
    float* row = s.ptr<float>(y);
    const int fy = freqY(y);
    for (int x = 1; x + 1 < end; x += 2) f(&row[x], &row[x + 1], (x + 1) / 2, fy);
  }
}
}  // namespace

void PhaseCorrelator::setReference(const cv::Mat& features, const cv::Mat& weights) {
  CV_Assert(features.type() == CV_32F);
  size_ = features.size();
  padded_ = cv::Size(cv::getOptimalDFTSize(size_.width), cv::getOptimalDFTSize(size_.height));
  cv::createHanningWindow(window_, size_, CV_32F);
  // The band-pass weight of every packed element.
  band_.create(padded_, CV_32F);
  const double lx = lowPass_ * padded_.width / 2.0, ly = lowPass_ * padded_.height / 2.0;
  const double hx = highPass_ * padded_.width / 2.0, hy = highPass_ * padded_.height / 2.0;
  forEachCcs(band_, [&](float* re, float* im, int fx, int fy) {
    const double low = std::exp(-0.5 * (fx * fx / (lx * lx) + fy * fy / (ly * ly)));
    const double high = 1 - std::exp(-0.5 * (fx * fx / (hx * hx) + fy * fy / (hy * hy)));
    *re = static_cast<float>(low * high);
    if (im) *im = *re;
  });
  prepare(features, weights, refSpectrum_);
}

const cv::Mat& PhaseCorrelator::correlate(const cv::Mat& features) {
  CV_Assert(features.size() == size_ && features.type() == CV_32F);
  prepare(features, cv::Mat(), spectrum_);
  cv::mulSpectrums(spectrum_, refSpectrum_, cross_, 0, /*conjB=*/true);
  // Whiten and band-limit in one pass.
  forEachCcs(cross_, [&](float* re, float* im, int, int) {
    const size_t index = static_cast<size_t>(re - cross_.ptr<float>(0));
    const float b = band_.ptr<float>(0)[index];
    if (!im) {
      *re = *re >= 0 ? b : -b;
      return;
    }
    const float mag2 = *re * *re + *im * *im;
    const float k = whitening_ == 1.0f   ? b / (std::sqrt(mag2) + 1e-12f)
                    : whitening_ == 0.5f ? b / (std::sqrt(std::sqrt(mag2)) + 1e-12f)
                                         : b / (std::pow(mag2, 0.5f * whitening_) + 1e-12f);
    *re *= k;
    *im *= k;
  });
  cv::dft(cross_, surface_, cv::DFT_INVERSE | cv::DFT_REAL_OUTPUT | cv::DFT_SCALE);
  return surface_;
}

namespace {
inline float at(const cv::Mat& s, int x, int y) {
  x %= s.cols;
  y %= s.rows;
  if (x < 0) x += s.cols;
  if (y < 0) y += s.rows;
  return s.at<float>(y, x);
}

// Sub-pixel offset of a peak from three samples: a Gaussian fit when all are
// positive (the band-limited peak is close to Gaussian), a parabola otherwise.
double vertex(double m, double c, double p) {
  if (m > 0 && c > 0 && p > 0) {
    const double lm = std::log(m), lc = std::log(c), lp = std::log(p);
    const double den = lm - 2 * lc + lp;
    if (den < 0) return std::clamp(0.5 * (lm - lp) / den, -0.5, 0.5);
  }
  const double den = m - 2 * c + p;
  return den < 0 ? std::clamp(0.5 * (m - p) / den, -0.5, 0.5) : 0.0;
}
}  // namespace

Peak PhaseCorrelator::peakNear(cv::Point2d centre, double radius,
                               const std::vector<cv::Point2d>& avoid, double avoidRadius) const {
  const int x0 = static_cast<int>(std::floor(centre.x - radius));
  const int x1 = static_cast<int>(std::ceil(centre.x + radius));
  const int y0 = static_cast<int>(std::floor(centre.y - radius));
  const int y1 = static_cast<int>(std::ceil(centre.y + radius));
  const double r2 = radius * radius;
  float best = -1e30f;
  int bx = 0, by = 0;
  for (int y = y0; y <= y1; ++y)
    for (int x = x0; x <= x1; ++x) {
      const double dx = x - centre.x, dy = y - centre.y;
      if (dx * dx + dy * dy > r2) continue;
      if (std::any_of(avoid.begin(), avoid.end(),
                      [&](cv::Point2d a) { return std::hypot(x - a.x, y - a.y) <= avoidRadius; }))
        continue;
      const float v = at(surface_, x, y);
      if (v > best) {
        best = v;
        bx = x;
        by = y;
      }
    }
  Peak p;
  p.value = best;
  p.shift.x = bx + vertex(at(surface_, bx - 1, by), best, at(surface_, bx + 1, by));
  p.shift.y = by + vertex(at(surface_, bx, by - 1), best, at(surface_, bx, by + 1));
  return p;
}

Peak PhaseCorrelator::globalPeak() const {
  double best = 0;
  cv::Point loc;
  cv::minMaxLoc(surface_, nullptr, &best, nullptr, &loc);
  const int bx = loc.x <= surface_.cols / 2 ? loc.x : loc.x - surface_.cols;
  const int by = loc.y <= surface_.rows / 2 ? loc.y : loc.y - surface_.rows;
  Peak p;
  p.value = best;
  p.shift.x = bx + vertex(at(surface_, bx - 1, by), best, at(surface_, bx + 1, by));
  p.shift.y = by + vertex(at(surface_, bx, by - 1), best, at(surface_, bx, by + 1));
  return p;
}

}  // namespace budledger::registration
