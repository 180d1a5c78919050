#include "core/register/features.h"

#include <opencv2/imgproc.hpp>

namespace budledger::registration {

void structureFeatures(const cv::Mat& image, cv::Mat& out, const FeatureOptions& options) {
  cv::Mat f, gx, gy;
  image.convertTo(f, CV_32F);
  if (options.smoothSigma > 0) cv::GaussianBlur(f, f, cv::Size(), options.smoothSigma);
  cv::Sobel(f, gx, CV_32F, 1, 0, 3, 0.125);
  cv::Sobel(f, gy, CV_32F, 0, 1, 3, 0.125);
  cv::magnitude(gx, gy, out);
  if (options.highPassSigma > 0) {
    cv::Mat mean;
    cv::GaussianBlur(out, mean, cv::Size(), options.highPassSigma);
    out -= mean;
  }
}

double focusMeasure(const cv::Mat& image) {
  cv::Mat f, gx, gy;
  image.convertTo(f, CV_32F);
  cv::GaussianBlur(f, f, cv::Size(), 0.8);
  cv::Sobel(f, gx, CV_32F, 1, 0, 3, 0.125);
  cv::Sobel(f, gy, CV_32F, 0, 1, 3, 0.125);
  const double energy = (gx.dot(gx) + gy.dot(gy)) / static_cast<double>(f.total());
  const double mean = cv::mean(f)[0];
  return mean > 0 ? energy / (mean * mean) : 0.0;
}

}  // namespace budledger::registration
