#pragma once
// DisplayLevels: the black and white points that map a crop's raw
// intensities to screen grey, as fractions of the image type's full scale,
// and the two helpers that use them: applying levels to a crop, and finding
// auto levels from a sample (percentiles, so a few hot pixels do not flatten
// the picture). Invariant: 0 <= black < white <= 1.
#include <QImage>

namespace budledger::ui {

struct DisplayLevels {
  double black = 0.0;
  double white = 1.0;

  friend bool operator==(const DisplayLevels&, const DisplayLevels&) = default;

  // Brightness/contrast as the user sees them: the window's centre and the
  // inverse of its width (contrast 1 = full scale).
  double brightness() const { return 1.0 - (black + white) / 2.0; }
  double contrast() const { return 1.0 / (white - black); }
  static DisplayLevels fromBrightnessContrast(double brightness, double contrast);
  DisplayLevels normalised() const;
};

// Grayscale8 image with `levels` applied; accepts Grayscale8/16 (others are
// converted to Grayscale16 first). A null input gives a null result.
QImage applyLevels(const QImage& raw, const DisplayLevels& levels);

// Levels that put the `lowPercentile` and `highPercentile` of `sample`'s
// intensities at black and white (0.5 / 99.5 is common practice for
// fluorescence and bright-field display).
DisplayLevels autoLevels(const QImage& sample, double lowPercentile = 0.5,
                         double highPercentile = 99.5);

}  // namespace budledger::ui
