#pragma once
// StripGeometry: the vertical maths of the time strips — traps stacked as
// lanes, each lane an image strip with an event lane under it — and the zoom
// rule that decides between full crops and the compact kymograph. Free of
// widgets; paired with TimeAxis for x.
//
// Content coordinates: lane i occupies [laneTop(i), laneTop(i) + laneHeight())
// on the y axis: image strip, then event lane, then a gap. Invariants: all
// heights > 0; laneCount >= 0.
#include <QRectF>
#include <QSizeF>
#include <utility>

#include "ui/time_axis.h"

namespace budledger::ui {

enum class StripMode {
  Crops,      // one registered crop per frame
  Kymograph,  // one line profile through the trap axis per frame (compact)
};

class StripGeometry {
 public:
  // Below this many pixels per frame a crop is too thin to read: switch to
  // the kymograph, whose one-pixel profiles stay legible down to 1.5 px.
  static constexpr double kCropModeMinPixelsPerFrame = 16.0;
  static constexpr double kEventLaneHeight = 26.0;
  // Zoomed out, calls crowd: two staggered rows of glyphs need more height.
  static constexpr double kCompactEventLaneHeight = 32.0;
  static constexpr double kLaneGap = 6.0;
  static constexpr double kKymographHeight = 48.0;
  static constexpr double kMinCropHeight = 40.0;
  static constexpr double kMaxCropHeight = 220.0;

  enum class Part { None, Strip, Events, Gap };
  struct Hit {
    int lane = -1;
    Part part = Part::None;
  };

  StripGeometry() = default;
  // `cropSize` is the native size of a trap crop (width along time, height
  // along the trap axis); an empty size means "no images" (kymograph height).
  StripGeometry(int laneCount, QSizeF cropSize, double pixelsPerFrame);

  static StripMode modeFor(double pixelsPerFrame);
  StripMode mode() const { return mode_; }
  int laneCount() const { return laneCount_; }
  double stripHeight() const { return stripHeight_; }
  double eventLaneHeight() const {
    return mode_ == StripMode::Kymograph ? kCompactEventLaneHeight : kEventLaneHeight;
  }
  double laneHeight() const { return stripHeight_ + eventLaneHeight() + kLaneGap; }
  double contentHeight() const { return laneCount_ * laneHeight(); }
  double laneTop(int lane) const { return lane * laneHeight(); }

  // Full width rectangles of a lane's parts (x from 0 to `width`).
  QRectF stripRect(int lane, double width) const;
  QRectF eventRect(int lane, double width) const;
  // The image slot of (lane, frame) in content coordinates.
  QRectF slotRect(const TimeAxis& axis, int lane, int frame) const;

  Hit hitAt(double y) const;
  // Lanes intersecting [y0, y1), clamped; first > last when none.
  std::pair<int, int> lanesIn(double y0, double y1) const;

 private:
  int laneCount_ = 0;
  StripMode mode_ = StripMode::Kymograph;
  double stripHeight_ = kKymographHeight;
};

}  // namespace budledger::ui
