#include "ui/strip_geometry.h"

#include <algorithm>
#include <cmath>

namespace budledger::ui {

StripGeometry::StripGeometry(int laneCount, QSizeF cropSize, double pixelsPerFrame)
    : laneCount_(std::max(0, laneCount)), mode_(modeFor(pixelsPerFrame)) {
  if (mode_ == StripMode::Crops && cropSize.width() > 0 && cropSize.height() > 0) {
    // Keep the crop's aspect so cells are not squashed as the zoom changes.
    const double h = pixelsPerFrame * cropSize.height() / cropSize.width();
    stripHeight_ = std::clamp(std::round(h), kMinCropHeight, kMaxCropHeight);
  } else {
    stripHeight_ = kKymographHeight;
  }
}

StripMode StripGeometry::modeFor(double pixelsPerFrame) {
  return pixelsPerFrame >= kCropModeMinPixelsPerFrame ? StripMode::Crops : StripMode::Kymograph;
}

QRectF StripGeometry::stripRect(int lane, double width) const {
  return {0, laneTop(lane), width, stripHeight_};
}

QRectF StripGeometry::eventRect(int lane, double width) const {
  return {0, laneTop(lane) + stripHeight_, width, eventLaneHeight()};
}

QRectF StripGeometry::slotRect(const TimeAxis& axis, int lane, int frame) const {
  return {axis.frameLeft(frame), laneTop(lane), axis.pixelsPerFrame(), stripHeight_};
}

StripGeometry::Hit StripGeometry::hitAt(double y) const {
  if (y < 0 || laneCount_ == 0) return {};
  const int lane = static_cast<int>(std::floor(y / laneHeight()));
  if (lane >= laneCount_) return {};
  const double inLane = y - laneTop(lane);
  if (inLane < stripHeight_) return {lane, Part::Strip};
  if (inLane < stripHeight_ + eventLaneHeight()) return {lane, Part::Events};
  return {lane, Part::Gap};
}

std::pair<int, int> StripGeometry::lanesIn(double y0, double y1) const {
  if (laneCount_ == 0 || y1 <= y0) return {0, -1};
  const int first = static_cast<int>(std::floor(y0 / laneHeight()));
  const int last = static_cast<int>(std::ceil(y1 / laneHeight())) - 1;
  if (last < 0 || first >= laneCount_) return {0, -1};
  return {std::max(first, 0), std::min(last, laneCount_ - 1)};
}

}  // namespace budledger::ui
