#include "core/register/refine.h"

#include <opencv2/imgproc.hpp>

#include <cmath>

namespace budledger::registration {

void TranslationRefiner::prepare(const cv::Mat& weights, Sums& s) const {
  s.w = weights;
  s.wr = s.w.mul(ref_);
  s.wgx = s.w.mul(gx_);
  s.wgy = s.w.mul(gy_);
  s.sw = cv::sum(s.w)[0];
  s.swr = cv::sum(s.wr)[0];
  s.swrr = s.wr.dot(ref_);
  s.sgx = cv::sum(s.wgx)[0];
  s.sgy = cv::sum(s.wgy)[0];
  s.sgxr = s.wgx.dot(ref_);
  s.sgyr = s.wgy.dot(ref_);
  s.h11 = s.wgx.dot(gx_);
  s.h12 = s.wgx.dot(gy_);
  s.h22 = s.wgy.dot(gy_);
}

void TranslationRefiner::setReference(const cv::Mat& patch, const cv::Mat& weights) {
  CV_Assert(patch.type() == CV_32F);
  ref_ = patch.clone();
  cv::Sobel(ref_, gx_, CV_32F, 1, 0, 3, 0.125);
  cv::Sobel(ref_, gy_, CV_32F, 0, 1, 3, 0.125);
  cv::Mat w = weights.empty() ? cv::Mat(ref_.size(), CV_32F, cv::Scalar(1)) : weights.clone();
  // Sobel is undefined at the border: give it no say.
  w.row(0).setTo(0);
  w.row(w.rows - 1).setTo(0);
  w.col(0).setTo(0);
  w.col(w.cols - 1).setTo(0);
  prepare(w, base_);
}

bool TranslationRefiner::warp(const cv::Mat& features, cv::Point2d at, const Sums& s, Moments& m) {
  const int w = ref_.cols, h = ref_.rows;
  const int ix = static_cast<int>(std::floor(at.x)), iy = static_cast<int>(std::floor(at.y));
  const float fx = static_cast<float>(at.x - ix), fy = static_cast<float>(at.y - iy);
  if (ix < 0 || iy < 0 || ix + w + 1 > features.cols || iy + h + 1 > features.rows) return false;
  const float k00 = (1 - fx) * (1 - fy), k01 = fx * (1 - fy), k10 = (1 - fx) * fy, k11 = fx * fy;
  v_.create(h, w, CV_32F);
  m = Moments{};
  for (int y = 0; y < h; ++y) {
    const float* a = features.ptr<float>(iy + y) + ix;
    const float* b = features.ptr<float>(iy + y + 1) + ix;
    const float* wt = s.w.ptr<float>(y);
    const float* wr = s.wr.ptr<float>(y);
    const float* wgx = s.wgx.ptr<float>(y);
    const float* wgy = s.wgy.ptr<float>(y);
    float* v = v_.ptr<float>(y);
    float sv = 0, svv = 0, srv = 0, sgxv = 0, sgyv = 0;
#pragma omp simd reduction(+ : sv, svv, srv, sgxv, sgyv)
    for (int x = 0; x < w; ++x) {
      const float value = k00 * a[x] + k01 * a[x + 1] + k10 * b[x] + k11 * b[x + 1];
      v[x] = value;
      const float wv = wt[x] * value;
      sv += wv;
      svv += wv * value;
      srv += wr[x] * value;
      sgxv += wgx[x] * value;
      sgyv += wgy[x] * value;
    }
    m.sv += sv;
    m.svv += svv;
    m.srv += srv;
    m.sgxv += sgxv;
    m.sgyv += sgyv;
  }
  return true;
}

void TranslationRefiner::iterate(const cv::Mat& features, cv::Point2d offset, const Sums& s,
                                 const RefineOptions& options, RefineResult& r) {
  r.converged = false;
  if (s.sw <= 0) return;
  const double mr = s.swr / s.sw, vr = s.swrr / s.sw - mr * mr;
  if (vr <= 0) return;
  double lastDx = 0, lastDy = 0;
  for (int it = 0; it < options.iterations; ++it) {
    Moments mo;
    if (!warp(features, offset + r.shift, s, mo)) return;
    const double si = mo.sv, sii = mo.svv, sri = mo.srv;
    // Gain from the ratio of spreads and offset from the means. (The
    // regression slope cov/var would shrink with any misalignment, make the
    // step too long and the iteration oscillate.)
    const double mi = si / s.sw, vi = sii / s.sw - mi * mi, cri = sri / s.sw - mr * mi;
    if (vi <= 0 || cri <= 0) return;
    const double gain = std::sqrt(vi / vr), off = mi - gain * mr;
    r.gain = gain;
    r.correlation = cri / std::sqrt(vr * vi);
    // Gauss-Newton step: J = gain * grad(ref), residual e = v - gain * ref - offset.
    const double b1 = gain * (mo.sgxv - gain * s.sgxr - off * s.sgx);
    const double b2 = gain * (mo.sgyv - gain * s.sgyr - off * s.sgy);
    const double det = gain * gain * (s.h11 * s.h22 - s.h12 * s.h12);
    if (det <= 1e-12 * gain * gain * (s.h11 + s.h22) * (s.h11 + s.h22)) return;
    double dx = -(s.h22 * b1 - s.h12 * b2) / det;
    double dy = -(s.h11 * b2 - s.h12 * b1) / det;
    // A step that reverses the last one overshot: take half of it.
    if (dx * lastDx + dy * lastDy < 0) {
      dx *= 0.5;
      dy *= 0.5;
    }
    const double step = std::hypot(dx, dy);
    if (step > 1.0) {
      dx /= step;
      dy /= step;
    }
    lastDx = dx;
    lastDy = dy;
    r.shift.x += dx;
    r.shift.y += dy;
    if (step < options.tolerance) {
      r.converged = true;
      return;
    }
    r.converged = it + 1 == options.iterations && step < 10 * options.tolerance;
  }
}

RefineResult TranslationRefiner::refine(const cv::Mat& features, cv::Point2d offset,
                                        cv::Point2d initial, const RefineOptions& options) {
  RefineResult result;
  result.shift = initial;
  iterate(features, offset, base_, options, result);
  Moments mo;
  if (!options.robust || !result.converged || !warp(features, offset + result.shift, base_, mo))
    return result;
  // Cauchy weights from the residuals at the converged shift.
  const double mr = base_.swr / base_.sw, mi = mo.sv / base_.sw;
  const float gain = static_cast<float>(result.gain);
  const float off = static_cast<float>(mi - result.gain * mr);
  double sse = 0;
  for (int y = 0; y < v_.rows; ++y) {
    const float* v = v_.ptr<float>(y);
    const float* r = ref_.ptr<float>(y);
    const float* wt = base_.w.ptr<float>(y);
    float part = 0;
#pragma omp simd reduction(+ : part)
    for (int x = 0; x < v_.cols; ++x) {
      const float e = v[x] - gain * r[x] - off;
      part += wt[x] * e * e;
    }
    sse += part;
  }
  const float inv = static_cast<float>(base_.sw / (6.25 * sse));  // 1 / (2.5 sigma)^2
  if (!(sse > 0)) return result;
  cv::Mat weights(v_.size(), CV_32F);
  for (int y = 0; y < v_.rows; ++y) {
    const float* v = v_.ptr<float>(y);
    const float* r = ref_.ptr<float>(y);
    const float* wt = base_.w.ptr<float>(y);
    float* out = weights.ptr<float>(y);
#pragma omp simd
    for (int x = 0; x < v_.cols; ++x) {
      const float e = v[x] - gain * r[x] - off;
      out[x] = wt[x] / (1.0f + e * e * inv);
    }
  }
  prepare(weights, robust_);
  RefineResult again = result;
  iterate(features, offset, robust_, options, again);
  if (again.converged &&
      std::hypot(again.shift.x - result.shift.x, again.shift.y - result.shift.y) < 1.0)
    return again;
  return result;
}

}  // namespace budledger::registration
