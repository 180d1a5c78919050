#include "core/register/drift_tracker.h"

#include <algorithm>
#include <cmath>

#include <opencv2/imgproc.hpp>

#include "core/base/median.h"

namespace budledger::registration {
namespace {
// A frame filled in from its neighbours was not measured: never more than this.
constexpr double kInterpolatedConfidence = 0.3;
// An alias of a large move replaces it only if it matches the previous frame clearly
// better: its residual (1 - correlation coefficient) under this share of the move's.
constexpr double kAliasResidual = 0.75;

// Frames are compared with the previous one at half resolution, band-passed.
constexpr int kReduce = 2;
cv::Mat reduce(const cv::Mat& image) {
  cv::Mat f, small;
  image.convertTo(f, CV_32F);
  cv::resize(f, small, cv::Size(image.cols / kReduce, image.rows / kReduce), 0, 0, cv::INTER_AREA);
  // Band-pass: noise out, and the illumination, which stays with the camera while the
  // chip moves, out too.
  cv::Mat fine, broad;
  cv::GaussianBlur(small, fine, cv::Size(0, 0), 1.0);
  cv::GaussianBlur(small, broad, cv::Size(0, 0), 8.0);
  return fine - broad;
}
}  // namespace

DriftTracker::DriftTracker(Registrar& registrar, const TrackOptions& options)
    : registrar_(registrar), options_(options) {}

void DriftTracker::add(int frame, const cv::Mat& image) {
  Measurement m = registrar_.measure(image, prediction_);
  if (!previous_.empty() && cv::norm(m.shift - prediction_) > options_.jumpPx)
    m = resolveAlias(image, m);
  const double quality = m.correlation;
  frames_.push_back(frame);
  raw_.push_back(m);
  // Only a convincing measurement moves the prediction: a blurred or
  // flickering frame must not drag the search away from the chip.
  const double typical = upperMedian(recentMatches_);
  const bool trusted = recentMatches_.size() < 3 || quality >= options_.failFraction * typical;
  if (trusted) {
    prediction_ = m.shift;
    image.copyTo(previous_);  // reduced only when a large move needs it
    previousShift_ = m.shift;
    recentMatches_.push_back(quality);
    if (recentMatches_.size() > 15) recentMatches_.erase(recentMatches_.begin());
  }
}

// On a lattice of traps, a stage jump of nearly a pitch is closer to the alias one
// pitch back than to the last position, and the reference (hours earlier) cannot tell
// them apart: the posts match either way, and only the cells, which have changed since,
// and the array's edges differ. The previous frame has the same cells: the true shift
// lines them up as well as the posts, an alias lines each trap up with its neighbour.
// So after a large move the chosen shift and its aliases one lattice vector away are
// compared with the previous frame, and the best is refined. (On one held-out hard
// position a jump of 0.8 pitch was taken one trap column short, and every trap read
// its neighbour for the rest of the movie.)
Measurement DriftTracker::resolveAlias(const cv::Mat& image, const Measurement& m) const {
  const RegistrationOptions& o = registrar_.options();
  const cv::Point2d a = o.latticeA, b = o.latticeB;
  if (std::abs(a.x * b.y - a.y * b.x) < 1e-6) return m;
  const cv::Mat now = reduce(image), before = reduce(previous_);
  const double chosen = agreement(now, before, m.shift);
  double best = chosen;
  cv::Point2d bestShift = m.shift;
  for (int i = -1; i <= 1; ++i)
    for (int j = -1; j <= 1; ++j) {
      if (i == 0 && j == 0) continue;
      const cv::Point2d c = m.shift + i * a + j * b;
      const double score = agreement(now, before, c);
      if (score > best) {
        best = score;
        bestShift = c;
      }
    }
  if (bestShift == m.shift || 1 - best > kAliasResidual * (1 - chosen)) return m;
  Measurement alt = registrar_.refineOnly(image, bestShift);
  alt.jump = true;
  return alt.refined ? alt : m;
}

// How well `now` (this frame, reduced) matches `before` (the previous frame, reduced)
// if this frame's shift is `shift`: both then show the same chip point at the same
// place, so this frame at y matches the previous one at y - (shift - previousShift).
// -1 when they barely overlap.
double DriftTracker::agreement(const cv::Mat& now, const cv::Mat& before, cv::Point2d shift) const {
  const cv::Point2d d = (shift - previousShift_) / kReduce;
  const int dx = static_cast<int>(std::floor(d.x)), dy = static_cast<int>(std::floor(d.y));
  const cv::Rect frame(0, 0, now.cols, now.rows);
  // One pixel short of the integer overlap, for the sub-pixel part of the shift.
  cv::Rect here = frame & (frame + cv::Point(dx, dy));
  here = cv::Rect(here.x + 1, here.y + 1, here.width - 2, here.height - 2);
  if (here.width <= 0 || here.height <= 0 || here.area() < frame.area() / 4) return -1;
  // The previous frame at y - d, sampled bilinearly (posts' edges misplaced by a
  // fraction of a pixel would outweigh the cells).
  const cv::Mat M = (cv::Mat_<double>(2, 3) << 1, 0, d.x, 0, 1, d.y);  // dst(y) = src(y - d)
  cv::Mat carried;
  cv::warpAffine(before, carried, M, before.size(), cv::INTER_LINEAR, cv::BORDER_REPLICATE);
  // Zero-mean normalised cross-correlation (gain and offset, such as lamp flicker,
  // cancel): a template match of two same-size images has one position.
  cv::Mat score;
  cv::matchTemplate(now(here), carried(here), score, cv::TM_CCOEFF_NORMED);
  return score.at<float>(0, 0);
}

DriftTrack DriftTracker::finish() const {
  const size_t n = raw_.size();
  DriftTrack track(n);
  std::vector<double> matches, focus;
  for (const auto& m : raw_) {
    matches.push_back(m.correlation);
    focus.push_back(m.focus);
  }
  const double medMatch = upperMedian(matches), medFocus = upperMedian(focus);
  std::vector<bool> good(n);
  for (size_t i = 0; i < n; ++i) {
    const auto& m = raw_[i];
    auto& d = track[i];
    d.frame = frames_[i];
    d.dx = m.shift.x;
    d.dy = m.shift.y;
    d.match = m.correlation;
    d.rawFocus = m.focus;
    d.focus = medFocus > 0 ? m.focus / medFocus : 0;
    // Trust falls with a poorer match than usual, with blur (a defocused
    // frame still registers, but less precisely) and without refinement.
    d.confidence = medMatch > 0 ? std::clamp(m.correlation / medMatch, 0.0, 1.0) : 0;
    d.confidence *= std::clamp(d.focus / options_.sharpFocus, 0.0, 1.0);
    if (!m.refined) d.confidence *= 0.5;
    good[i] = medMatch > 0 && m.correlation >= options_.failFraction * medMatch;
    if (frames_[i] == options_.referenceFrame) d.flags |= FrameDrift::kReference;
  }
  // An isolated disagreement with two agreeing neighbours is an outlier.
  for (size_t i = 1; i + 1 < n; ++i) {
    if (!good[i - 1] || !good[i + 1]) continue;
    const auto& a = track[i - 1];
    const auto& b = track[i];
    const auto& c = track[i + 1];
    const double ab = std::hypot(b.dx - a.dx, b.dy - a.dy);
    const double bc = std::hypot(c.dx - b.dx, c.dy - b.dy);
    const double ac = std::hypot(c.dx - a.dx, c.dy - a.dy);
    if (ab > options_.outlierPx && bc > options_.outlierPx && ac < options_.outlierPx / 2)
      good[i] = false;
  }
  // Fill unmeasurable frames from trusted neighbours: linearly while the
  // stage moves smoothly; across a jump, from the side the frame's own
  // (poor) measurement agrees with, since a blurred frame still tells
  // before from after.
  std::vector<size_t> trusted;
  for (size_t i = 0; i < n; ++i)
    if (good[i]) trusted.push_back(i);
  for (size_t i = 0; i < n; ++i) {
    if (good[i]) continue;
    auto& d = track[i];
    d.flags |= FrameDrift::kInterpolated;
    d.confidence = std::min(d.confidence, kInterpolatedConfidence);
    if (trusted.empty()) continue;
    const auto after = std::lower_bound(trusted.begin(), trusted.end(), i);
    const cv::Point2d measured(d.dx, d.dy);
    auto at = [&](size_t k) { return cv::Point2d(track[k].dx, track[k].dy); };
    cv::Point2d fill;
    if (after == trusted.begin()) {
      fill = at(*after);
    } else if (after == trusted.end()) {
      fill = at(trusted.back());
    } else {
      const size_t lo = *(after - 1), hi = *after;
      const cv::Point2d a = at(lo), b = at(hi);
      if (cv::norm(b - a) <= options_.jumpPx) {
        const double t =
            static_cast<double>(frames_[i] - frames_[lo]) / (frames_[hi] - frames_[lo]);
        fill = a + t * (b - a);
      } else if (std::min(cv::norm(measured - a), cv::norm(measured - b)) < options_.outlierPx) {
        fill = measured;
      } else {
        fill = cv::norm(measured - a) <= cv::norm(measured - b) ? a : b;
      }
    }
    d.dx = fill.x;
    d.dy = fill.y;
  }
  // Relative to frame 0, whichever frame was the reference.
  if (n > 0) {
    const double x0 = track[0].dx, y0 = track[0].dy;
    for (auto& d : track) {
      d.dx -= x0;
      d.dy -= y0;
    }
  }
  for (size_t i = 1; i < n; ++i)
    if (std::hypot(track[i].dx - track[i - 1].dx, track[i].dy - track[i - 1].dy) > options_.jumpPx)
      track[i].flags |= FrameDrift::kJump;
  return track;
}

}  // namespace budledger::registration
