#include "core/register/drift_tracker.h"

#include <algorithm>
#include <cmath>

namespace budledger::registration {
namespace {
// A frame filled in from its neighbours was not measured: never more than this.
constexpr double kInterpolatedConfidence = 0.3;

double median(std::vector<double> v) {
  if (v.empty()) return 0;
  const auto mid = v.begin() + static_cast<long>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}
}  // namespace

DriftTracker::DriftTracker(Registrar& registrar, const TrackOptions& options)
    : registrar_(registrar), options_(options) {}

void DriftTracker::add(int frame, const cv::Mat& image) {
  const Measurement m = registrar_.measure(image, prediction_);
  const double quality = m.correlation;
  frames_.push_back(frame);
  raw_.push_back(m);
  // Only a convincing measurement moves the prediction: a blurred or
  // flickering frame must not drag the search away from the chip.
  const double typical = median(recentMatches_);
  const bool trusted = recentMatches_.size() < 3 || quality >= options_.failFraction * typical;
  if (trusted) {
    prediction_ = m.shift;
    recentMatches_.push_back(quality);
    if (recentMatches_.size() > 15) recentMatches_.erase(recentMatches_.begin());
  }
}

DriftTrack DriftTracker::finish() const {
  const size_t n = raw_.size();
  DriftTrack track(n);
  std::vector<double> matches, focus;
  for (const auto& m : raw_) {
    matches.push_back(m.correlation);
    focus.push_back(m.focus);
  }
  const double medMatch = median(matches), medFocus = median(focus);
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
