#pragma once
// PhaseCorrelator: windowed, band-limited phase correlation of equally sized
// feature images against one reference whose spectrum is computed once. The
// cross-power spectrum is divided by |cross|^whitening: 1 is classical phase
// correlation; on a lattice of traps, whose spectrum is a few strong
// harmonics, full whitening raises the many empty frequencies to the same
// weight and lets noise and cells decide, so the registration uses 0.5
// (partial whitening), which keeps a brightness gain from mattering while
// the harmonics dominate. The result is then weighted by a band-pass: a Gaussian low-pass keeps
// pixel noise from dominating and makes the peak smooth enough for a sub-pixel fit; a high-pass
// drops the slow shading that is fixed to the camera and would pull the
// estimate towards zero. Spectra are kept in OpenCV's packed (CCS) form. Not thread-safe (scratch
// buffers are reused).
#include <vector>

#include <opencv2/core.hpp>

namespace budledger::registration {

struct Peak {
  cv::Point2d shift;  // image(x + shift) ~ reference(x)
  double value = 0;   // correlation height at the peak
};

class PhaseCorrelator {
 public:
  // Band edges as fractions of the Nyquist frequency.
  explicit PhaseCorrelator(double lowPass = 0.35, double highPass = 0.03, float whitening = 1.0f)
      : lowPass_(lowPass), highPass_(highPass), whitening_(whitening) {}

  // `features` CV_32F; `weights` (same size, or empty) emphasise the parts of
  // the reference to register on (the chip's static structure).
  void setReference(const cv::Mat& features, const cv::Mat& weights = {});
  cv::Size size() const { return size_; }

  // Correlation surface of `features` (same size as the reference) in wrapped
  // coordinates: element (y, x) holds shift (x or x - width, y or y - height).
  const cv::Mat& correlate(const cv::Mat& features);

  // The highest element of the last surface within `radius` of `centre` (in
  // shift coordinates) and not within `avoidRadius` of any of `avoid`, refined
  // to sub-pixel precision.
  Peak peakNear(cv::Point2d centre, double radius, const std::vector<cv::Point2d>& avoid = {},
                double avoidRadius = 0) const;
  // The highest element of the whole last surface, as the shift of smallest
  // magnitude it can stand for, refined to sub-pixel precision.
  Peak globalPeak() const;

 private:
  void prepare(const cv::Mat& features, const cv::Mat& weights, cv::Mat& spectrum);
  double lowPass_, highPass_;
  float whitening_;
  cv::Size size_;
  cv::Size padded_;
  cv::Mat window_, band_, refSpectrum_;
  cv::Mat scratch_, spectrum_, cross_, surface_;
};

}  // namespace budledger::registration
