#pragma once
// Structure features for registration: the gradient magnitude of a smoothed
// image with its local mean removed. Gradient magnitude ignores brightness
// offsets and the polarity flips of edges that defocus causes in brightfield;
// removing the local mean stops uneven illumination from dominating the
// correlation. Output is CV_32F of the input's size.
#include <opencv2/core.hpp>

namespace budledger::registration {

struct FeatureOptions {
  double smoothSigma = 1.5;    // px at the image's own scale
  double highPassSigma = 0.0;  // 0: no local-mean removal
};

void structureFeatures(const cv::Mat& image, cv::Mat& out, const FeatureOptions& options);

// Normalised gradient energy, mean |grad|^2 / mean(I)^2 of a lightly smoothed
// image: a focus measure that does not change with a brightness gain.
double focusMeasure(const cv::Mat& image);

}  // namespace budledger::registration
