#pragma once
// TimeAxis: the horizontal maths of the time strips, free of widgets so that
// the strip view, its header, the benchmark and the tests share one answer to
// "where is frame k?" and "which frame is under x?".
//
// Content coordinates: frame k occupies [k * pixelsPerFrame, (k + 1) *
// pixelsPerFrame) on the x axis; x = 0 is the left edge of frame 0. Scrolling
// is the caller's business (it subtracts its scroll offset). Invariants:
// frameCount >= 0, pixelsPerFrame within [kMinPixelsPerFrame, kMaxPixelsPerFrame],
// intervalMinutes > 0 when known.
#include <QString>
#include <optional>
#include <vector>

namespace budledger::ui {

class TimeAxis {
 public:
  static constexpr double kMinPixelsPerFrame = 1.5;
  static constexpr double kMaxPixelsPerFrame = 160.0;

  struct Tick {
    int frame = 0;
    double x = 0;       // content x of the frame's left edge
    bool major = true;  // major ticks carry labels
  };

  TimeAxis() = default;
  TimeAxis(int frameCount, std::optional<double> intervalMinutes, double pixelsPerFrame);

  int frameCount() const { return frameCount_; }
  std::optional<double> intervalMinutes() const { return intervalMinutes_; }
  double pixelsPerFrame() const { return ppf_; }
  void setFrameCount(int n);
  void setIntervalMinutes(std::optional<double> minutes);
  // Clamped to the allowed range; returns the value kept.
  double setPixelsPerFrame(double ppf);

  double contentWidth() const { return frameCount_ * ppf_; }
  double frameLeft(int frame) const { return frame * ppf_; }
  double frameCentre(int frame) const { return (frame + 0.5) * ppf_; }
  // Frame under content x, clamped to [0, frameCount - 1] (0 when empty).
  int frameAt(double x) const;
  // Frames whose slots intersect [x0, x1), clamped; first > last when none.
  std::pair<int, int> framesIn(double x0, double x1) const;
  // Clamps a frame into the movie.
  int clampFrame(int frame) const;

  // Elapsed time of a frame's start as "h:mm" (or "d:hh:mm" past 24 h when
  // `days`); empty when the interval is unknown.
  QString clockLabel(int frame) const;
  // Hours since frame 0, or nullopt when the interval is unknown.
  std::optional<double> hoursAt(int frame) const;

  // Ticks for the content range [x0, x1): major ticks at least `minLabelGap`
  // pixels apart at round times (5, 10, 15, 30 min, 1, 2, 3, 6, 12, 24 h) when
  // the interval is known and a round time falls on whole frames, else at
  // round frame counts (1, 2, 5, 10, 20, 50…); minor ticks in between when
  // there is room.
  std::vector<Tick> ticks(double x0, double x1, double minLabelGap) const;
  // The major tick step in frames chosen by ticks() for this gap.
  int majorStepFrames(double minLabelGap) const;

 private:
  int frameCount_ = 0;
  std::optional<double> intervalMinutes_;
  double ppf_ = 8.0;
};

}  // namespace budledger::ui
