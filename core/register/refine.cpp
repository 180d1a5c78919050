#include "core/register/refine.h"

#include <opencv2/imgproc.hpp>

#include <cmath>

namespace budledger::registration {

void TranslationRefiner::setReference(const cv::Mat& patch, const cv::Mat& weights) {
  CV_Assert(patch.type() == CV_32F);
  ref_ = patch.clone();
  cv::Mat gx, gy;
  cv::Sobel(ref_, gx, CV_32F, 1, 0, 3, 0.125);
  cv::Sobel(ref_, gy, CV_32F, 0, 1, 3, 0.125);
  w_ = weights.empty() ? cv::Mat(ref_.size(), CV_32F, cv::Scalar(1)) : weights.clone();
  // Sobel is undefined at the border: give it no say.
  w_.row(0).setTo(0);
  w_.row(w_.rows - 1).setTo(0);
  w_.col(0).setTo(0);
  w_.col(w_.cols - 1).setTo(0);
  wr_ = w_.mul(ref_);
  wgx_ = w_.mul(gx);
  wgy_ = w_.mul(gy);
  sw_ = cv::sum(w_)[0];
  swr_ = cv::sum(wr_)[0];
  swrr_ = wr_.dot(ref_);
  sgx_ = cv::sum(wgx_)[0];
  sgy_ = cv::sum(wgy_)[0];
  sgxr_ = wgx_.dot(ref_);
  sgyr_ = wgy_.dot(ref_);
  h11_ = wgx_.dot(gx);
  h12_ = wgx_.dot(gy);
  h22_ = wgy_.dot(gy);
}

RefineResult TranslationRefiner::refine(const cv::Mat& features, cv::Point2d offset,
                                        cv::Point2d initial, int iterations,
                                        double tolerance) {
  RefineResult result;
  result.shift = initial;
  const int w = ref_.cols, h = ref_.rows;
  if (sw_ <= 0) return result;
  const double mr = swr_ / sw_, vr = swrr_ / sw_ - mr * mr;
  if (vr <= 0) return result;
  for (int it = 0; it < iterations; ++it) {
    const double sx = offset.x + result.shift.x, sy = offset.y + result.shift.y;
    const int ix = static_cast<int>(std::floor(sx)), iy = static_cast<int>(std::floor(sy));
    const double fx = sx - ix, fy = sy - iy;
    if (ix < 0 || iy < 0 || ix + w + 1 > features.cols || iy + h + 1 > features.rows) {
      result.converged = false;
      return result;
    }
    // Bilinear warp with one fractional offset for the whole patch.
    cv::addWeighted(features(cv::Rect(ix, iy, w, h)), (1 - fx) * (1 - fy),
                    features(cv::Rect(ix + 1, iy, w, h)), fx * (1 - fy), 0, t1_);
    cv::addWeighted(features(cv::Rect(ix, iy + 1, w, h)), (1 - fx) * fy,
                    features(cv::Rect(ix + 1, iy + 1, w, h)), fx * fy, 0, t2_);
    cv::add(t1_, t2_, v_);
    cv::multiply(w_, v_, wv_);
    const double si = cv::sum(wv_)[0], sii = wv_.dot(v_), sri = wr_.dot(v_);
    // Gain and offset by weighted least squares of image on reference.
    const double mi = si / sw_, vi = sii / sw_ - mi * mi, cri = sri / sw_ - mr * mi;
    if (vi <= 0) return result;
    const double gain = cri / vr, off = mi - gain * mr;
    result.gain = gain;
    result.correlation = cri / std::sqrt(vr * vi);
    if (gain <= 0) return result;
    // Gauss-Newton step: J = gain * grad(ref), residual e = v - gain * ref - offset.
    const double b1 = gain * (wgx_.dot(v_) - gain * sgxr_ - off * sgx_);
    const double b2 = gain * (wgy_.dot(v_) - gain * sgyr_ - off * sgy_);
    const double g2 = gain * gain;
    const double det = g2 * g2 * (h11_ * h22_ - h12_ * h12_);
    if (det <= 1e-12 * g2 * g2 * (h11_ + h22_) * (h11_ + h22_)) return result;
    double dx = -g2 * (h22_ * b1 - h12_ * b2) / det;
    double dy = -g2 * (h11_ * b2 - h12_ * b1) / det;
    const double step = std::hypot(dx, dy);
    if (step > 1.0) {
      dx /= step;
      dy /= step;
    }
    result.shift.x += dx;
    result.shift.y += dy;
    if (step < tolerance) {
      result.converged = true;
      break;
    }
    result.converged = it + 1 == iterations && step < 10 * tolerance;
  }
  return result;
}

}  // namespace budledger::registration
