#pragma once
// TranslationRefiner: Gauss-Newton refinement of a sub-pixel translation
// between a reference feature patch and an image's features, with a gain and
// an offset solved alongside (brightness flicker). Inverse-compositional:
// the reference's gradients and every weighted sum that involves only the
// reference are computed once, so an iteration is one bilinear warp and a few
// dot products. Once converged it can reweight pixels by their residual
// (Cauchy weights) and iterate again, so that cells which grow or move next
// to the posts pull the estimate as little as possible. Starts from an
// estimate within about a pixel, as the coarse phase correlation gives. Not
// thread-safe.
#include <opencv2/core.hpp>

namespace budledger::registration {

struct RefineResult {
  cv::Point2d shift;  // image(x + shift) ~ gain * reference(x) + offset
  double gain = 1;
  double correlation = 0;  // weighted correlation of the aligned patches
  bool converged = false;
};

struct RefineOptions {
  int iterations = 4;
  double tolerance = 0.003;  // a step shorter than this (px) has converged
  bool robust = false;       // reweight by residual and iterate again
};

class TranslationRefiner {
 public:
  // `patch` CV_32F reference features; `weights` CV_32F (same size) or empty.
  void setReference(const cv::Mat& patch, const cv::Mat& weights);

  // `features`: image features over a region larger than the patch; the
  // reference pixel u is compared with features at u + offset + shift.
  RefineResult refine(const cv::Mat& features, cv::Point2d offset, cv::Point2d initial,
                      const RefineOptions& options);

 private:
  // Weighted sums of the reference that one set of weights implies.
  struct Sums {
    cv::Mat w, wr, wgx, wgy;
    double sw = 0, swr = 0, swrr = 0, sgx = 0, sgy = 0, sgxr = 0, sgyr = 0;
    double h11 = 0, h12 = 0, h22 = 0;
  };
  void prepare(const cv::Mat& weights, Sums& s) const;
  // Samples the features at `at` + each reference pixel (bilinear, one
  // fractional offset for the whole patch) into v_ and returns the sums an
  // iteration needs; false when the patch would leave the features.
  struct Moments {
    double sv = 0, svv = 0, srv = 0, sgxv = 0, sgyv = 0;
  };
  bool warp(const cv::Mat& features, cv::Point2d at, const Sums& s, Moments& m);
  // One pass of iterations with the given sums; updates `r`.
  void iterate(const cv::Mat& features, cv::Point2d offset, const Sums& s,
               const RefineOptions& options, RefineResult& r);

  cv::Mat ref_, gx_, gy_;
  Sums base_, robust_;
  cv::Mat v_;
};

}  // namespace budledger::registration
