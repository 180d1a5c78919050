#pragma once
// TranslationRefiner: Gauss-Newton refinement of a sub-pixel translation
// between a reference feature patch and an image's features, with a gain and
// an offset solved alongside (brightness flicker). Inverse-compositional:
// the reference's gradients and every weighted sum that involves only the
// reference are computed once, so an iteration is one bilinear warp and five
// dot products. Starts from an estimate within about a pixel, as the coarse
// phase correlation gives. Not thread-safe.
#include <opencv2/core.hpp>

namespace budledger::registration {

struct RefineResult {
  cv::Point2d shift;       // image(x + shift) ~ gain * reference(x) + offset
  double gain = 1;
  double correlation = 0;  // weighted correlation of the aligned patches
  bool converged = false;
};

class TranslationRefiner {
 public:
  // `patch` CV_32F reference features; `weights` CV_32F (same size) or empty.
  void setReference(const cv::Mat& patch, const cv::Mat& weights);

  // `features`: image features over a region larger than the patch; the
  // reference pixel u is compared with features at u + offset + shift.
  // Stops when a step is shorter than `tolerance` px (converged) or after
  // `iterations` steps.
  RefineResult refine(const cv::Mat& features, cv::Point2d offset, cv::Point2d initial,
                      int iterations, double tolerance = 0.003);

 private:
  cv::Mat ref_, w_, wr_, wgx_, wgy_;
  double sw_ = 0, swr_ = 0, swrr_ = 0, sgx_ = 0, sgy_ = 0, sgxr_ = 0, sgyr_ = 0;
  double h11_ = 0, h12_ = 0, h22_ = 0;
  cv::Mat t1_, t2_, v_, wv_;
};

}  // namespace budledger::registration
