#include "core/register/registrar.h"

#include <opencv2/imgproc.hpp>

#include <algorithm>
#include <cmath>

#include "core/register/features.h"

namespace budledger::registration {
namespace {
constexpr int kMargin = 8;  // px around the fine patch for filters and sub-pixel sampling (even)
// When the highest coarse peak refines to a correlation below kPoorMatch (a chip
// matched at all gives 0.85-0.95 in the tests and simulations; dust fixed to the
// camera 0.1-0.25), this many more peaks are refined and the best kept.
constexpr int kFallbackPeaks = 3;
constexpr double kPoorMatch = 0.5;
const FeatureOptions kCoarseFeatures{1.0, 0.0};  // the correlator's band-pass drops shading
const FeatureOptions kHalfFeatures{1.0, 0.0};
const FeatureOptions kFullFeatures{1.5, 0.0};

cv::Rect centred(cv::Size frame, cv::Size size) {
  return {(frame.width - size.width) / 2, (frame.height - size.height) / 2, size.width,
          size.height};
}

cv::Rect grown(const cv::Rect& r, int m) {
  return {r.x - m, r.y - m, r.width + 2 * m, r.height + 2 * m};
}

// Full- and half-resolution features of `image(region)`.
void patchFeatures(const cv::Mat& image, const cv::Rect& region, cv::Mat& half, cv::Mat& halfOut,
                   cv::Mat& fullOut) {
  structureFeatures(image(region), fullOut, kFullFeatures);
  cv::resize(image(region), half, cv::Size(region.width / 2, region.height / 2), 0, 0,
             cv::INTER_AREA);
  structureFeatures(half, halfOut, kHalfFeatures);
}
}  // namespace

Registrar::Registrar(const cv::Mat& reference, const cv::Mat& structure,
                     const RegistrationOptions& options)
    : options_(options), frameSize_(reference.size()) {
  CV_Assert(reference.type() == CV_8UC1 || reference.type() == CV_16UC1);
  CV_Assert(structure.empty() ||
            (structure.type() == CV_32F && structure.size() == reference.size()));
  const int ww = std::min(options.coarseWindow, frameSize_.width);
  const int wh = std::min(options.coarseWindow, frameSize_.height);
  factor_ = std::max(
      1, static_cast<int>(std::ceil(std::max(ww, wh) / static_cast<double>(options.coarseSize))));
  coarseRect_ = centred(frameSize_, cv::Size(ww / factor_ * factor_, wh / factor_ * factor_));
  searchRadius_ = options.searchRadius > 0 ? options.searchRadius : std::min(ww, wh) / 4.0;
  maxShift_ = options.maxShift > 0 ? options.maxShift
                                   : 0.45 * std::min(frameSize_.width, frameSize_.height);
  searchRadius_ = std::min(searchRadius_, maxShift_);

  reference.copyTo(refFrame_);
  if (!structure.empty()) structure.copyTo(structure_);
  const cv::Size small(coarseRect_.width / factor_, coarseRect_.height / factor_);
  cv::resize(reference(coarseRect_), small_, small, 0, 0, cv::INTER_AREA);
  structureFeatures(small_, smallFeatures_, kCoarseFeatures);
  coarse_.setReference(smallFeatures_);
}

bool Registrar::isAlias(cv::Point2d d) const {
  const cv::Point2d a = options_.latticeA, b = options_.latticeB;
  const double det = a.x * b.y - a.y * b.x;
  if (std::abs(det) < 1e-6) return false;
  const double i = std::round((d.x * b.y - d.y * b.x) / det);
  const double j = std::round((a.x * d.y - a.y * d.x) / det);
  if (i == 0 && j == 0) return false;
  const double tol = 0.2 * std::min(std::hypot(a.x, a.y), std::hypot(b.x, b.y));
  return std::hypot(d.x - i * a.x - j * b.x, d.y - i * a.y - j * b.y) < tol;
}

Registrar::FinePatch* Registrar::finePatchFor(cv::Point shift) {
  // The patch stays near the centre but inside both the reference and the
  // shifted frame, with a margin for filters and sampling; even sizes keep
  // the half-resolution grid aligned.
  int sw = std::min(options_.finePatch, frameSize_.width - 2 * kMargin - std::abs(shift.x));
  int sh = std::min(options_.finePatch, frameSize_.height - 2 * kMargin - std::abs(shift.y));
  sw &= ~1;
  sh &= ~1;
  if (sw < 32 || sh < 32) return nullptr;
  cv::Point origin = centred(frameSize_, cv::Size(sw, sh)).tl();
  origin.x = std::clamp(
      origin.x, std::max(kMargin, kMargin - shift.x),
      std::min(frameSize_.width - sw - kMargin, frameSize_.width - sw - kMargin - shift.x));
  origin.y = std::clamp(
      origin.y, std::max(kMargin, kMargin - shift.y),
      std::min(frameSize_.height - sh - kMargin, frameSize_.height - sh - kMargin - shift.y));
  const std::array<int, 4> key{origin.x, origin.y, sw, sh};
  auto it = fine_.find(key);
  if (it != fine_.end()) return &it->second;
  if (fine_.size() >= 8) fine_.clear();  // bounded: patches move only near the frame's edge
  FinePatch& p = fine_[key];
  p.rect = cv::Rect(origin, cv::Size(sw, sh));
  cv::Mat half, halfFeatures, fullFeatures;
  patchFeatures(refFrame_, grown(p.rect, kMargin), half, halfFeatures, fullFeatures);
  constexpr int hm = kMargin / 2;
  cv::Mat fullWeights, halfWeights;
  if (!structure_.empty()) {
    fullWeights = structure_(p.rect).clone();
    cv::resize(fullWeights, halfWeights, cv::Size(sw / 2, sh / 2), 0, 0, cv::INTER_AREA);
  }
  p.full.setReference(fullFeatures(cv::Rect(kMargin, kMargin, sw, sh)), fullWeights);
  p.half.setReference(halfFeatures(cv::Rect(hm, hm, sw / 2, sh / 2)), halfWeights);
  return &p;
}

Measurement Registrar::measure(const cv::Mat& frame, cv::Point2d prediction) {
  CV_Assert(frame.size() == frameSize_ && frame.type() == refFrame_.type());
  Measurement m;
  // Coarse: the window follows the prediction so the overlap stays large.
  const double f = factor_;
  cv::Point wshift(static_cast<int>(std::lround(prediction.x / f)) * factor_,
                   static_cast<int>(std::lround(prediction.y / f)) * factor_);
  wshift.x = std::clamp(wshift.x, -coarseRect_.x, frameSize_.width - coarseRect_.br().x);
  wshift.y = std::clamp(wshift.y, -coarseRect_.y, frameSize_.height - coarseRect_.br().y);
  cv::resize(frame(coarseRect_ + wshift), small_, coarse_.size(), 0, 0, cv::INTER_AREA);
  structureFeatures(small_, smallFeatures_, kCoarseFeatures);
  coarse_.correlate(smallFeatures_);
  const cv::Point2d ws(wshift.x, wshift.y);
  Peak chosen = coarse_.peakNear((prediction - ws) / f, searchRadius_ / f);
  // A much stronger peak elsewhere is a jump; on a lattice every alias peak
  // is about as high as the true one, so there continuity wins.
  const Peak global = coarse_.globalPeak();
  const cv::Point2d apart = global.shift - chosen.shift;
  const cv::Point2d globalShift = global.shift * f + ws;
  if (std::hypot(apart.x, apart.y) > 2.0 && global.value > options_.jumpRatio * chosen.value &&
      std::hypot(globalShift.x, globalShift.y) <= maxShift_ && !isAlias(apart * f)) {
    chosen = global;
    m.jump = true;
  }
  m.coarsePeak = chosen.value;
  const cv::Point2d coarse = chosen.shift * f + ws;
  m.shift = coarse;
  refine(frame, coarse, 0.75 * f + 1.5, m);
  if (m.jump || (m.refined && m.correlation >= kPoorMatch)) return m;

  // The chip's own peak can be lower than one that is not the chip's: dust or
  // shading fixed to the camera peaks at zero shift, and as the stage drifts away
  // the overlap with the reference, and so the chip's peak, shrinks. Such a peak
  // aligns the frame poorly or not at all, so when the first does, the next peaks
  // in the search disc are refined too and the best aligned one is kept.
  std::vector<cv::Point2d> tried{chosen.shift};
  for (int k = 0; k < kFallbackPeaks; ++k) {
    const Peak next = coarse_.peakNear((prediction - ws) / f, searchRadius_ / f, tried, 2.0);
    if (next.value <= 0) break;
    tried.push_back(next.shift);
    Measurement alt;
    alt.coarsePeak = next.value;
    alt.shift = next.shift * f + ws;
    refine(frame, alt.shift, 0.75 * f + 1.5, alt);
    if (alt.refined && (!m.refined || alt.correlation > m.correlation)) m = alt;
  }
  return m;
}

Measurement Registrar::refineOnly(const cv::Mat& frame, cv::Point2d estimate) {
  CV_Assert(frame.size() == frameSize_ && frame.type() == refFrame_.type());
  Measurement m;
  m.shift = estimate;
  refine(frame, estimate, 1.5, m);
  return m;
}

void Registrar::setStructure(const cv::Mat& structure) {
  CV_Assert(structure.empty() || (structure.type() == CV_32F && structure.size() == frameSize_));
  structure_ = structure.empty() ? cv::Mat() : structure.clone();
  fine_.clear();
}

// Gauss-Newton at half, then full resolution, around the integer part of
// `start`, moving at most `reach` px from it.
void Registrar::refine(const cv::Mat& frame, cv::Point2d start, double reach, Measurement& m) {
  const cv::Point whole(static_cast<int>(std::lround(start.x)),
                        static_cast<int>(std::lround(start.y)));
  FinePatch* p = finePatchFor(whole);
  if (!p) return;
  const cv::Rect target = p->rect + whole;
  patchFeatures(frame, grown(target, kMargin), halfRegion_, halfFeatures_, fullFeatures_);
  constexpr double hm = kMargin / 2;
  cv::Point2d residual = start - cv::Point2d(whole);
  const RefineResult h = p->half.refine(halfFeatures_, {hm, hm}, residual / 2,
                                        {options_.refineIterations, 0.02, false});
  if (h.converged && std::hypot(2 * h.shift.x - residual.x, 2 * h.shift.y - residual.y) < reach)
    residual = 2 * h.shift;
  const RefineResult r = p->full.refine(fullFeatures_, {kMargin, kMargin}, residual,
                                        {options_.refineIterations, 0.003, options_.robust});
  m.correlation = r.correlation;
  const cv::Point2d moved = cv::Point2d(whole) + r.shift - start;
  if (r.converged && std::hypot(moved.x, moved.y) < reach) {
    m.shift = cv::Point2d(whole) + r.shift;
    m.refined = true;
  } else {
    m.shift = cv::Point2d(whole) + residual;
  }
  // Focus: gradient energy of the patch over its squared mean brightness.
  const cv::Mat inner = fullFeatures_(cv::Rect(kMargin, kMargin, target.width, target.height));
  const double mean = cv::mean(frame(target))[0];
  m.focus = mean > 0 ? inner.dot(inner) / static_cast<double>(inner.total()) / (mean * mean) : 0;
}

}  // namespace budledger::registration
