#pragma once
// CropSource: where the time strips get their pictures — the registered crop
// of one trap at one frame. The workstation's implementation sits on core's
// frame sources and trap lattice; tests and benchmarks bring their own.
// Implementations must be safe to call from several worker threads at once,
// and report unreadable input by throwing (InputError naming file and frame).
#include <QImage>
#include <QPointF>
#include <QSize>

#include "ui/review_event.h"

namespace budledger::ui {

class CropSource {
 public:
  virtual ~CropSource() = default;
  // Native size of every crop of this project (width across the trap, height
  // along its axis).
  virtual QSize cropSize() const = 0;
  // Format_Grayscale16 or Format_Grayscale8 at cropSize(); raw intensities
  // (display levels are applied by the loader).
  virtual QImage crop(TrapId trap, int frame) const = 0;
  // Where pixel (0, 0) of the engine's crop of this position falls in these
  // crops, so measured cell positions can be drawn on them.
  virtual QPointF measurementOrigin(int /*position*/) const { return {0, 0}; }
};

}  // namespace budledger::ui
