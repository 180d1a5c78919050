#include "ui/display_levels.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <vector>

namespace budledger::ui {

namespace {
constexpr double kMinWindow = 1.0 / 1024.0;
}

DisplayLevels DisplayLevels::normalised() const {
  double b = std::clamp(std::isfinite(black) ? black : 0.0, 0.0, 1.0 - kMinWindow);
  double w = std::clamp(std::isfinite(white) ? white : 1.0, b + kMinWindow, 1.0);
  return {b, w};
}

DisplayLevels DisplayLevels::fromBrightnessContrast(double brightness, double contrast) {
  contrast = std::max(contrast, 1.0);
  const double width = 1.0 / contrast;
  const double centre = 1.0 - brightness;
  double b = centre - width / 2;
  double w = centre + width / 2;
  if (b < 0) w -= b, b = 0;
  if (w > 1) b -= w - 1, w = 1;
  return DisplayLevels{b, w}.normalised();
}

QImage applyLevels(const QImage& raw, const DisplayLevels& levelsIn) {
  if (raw.isNull()) return {};
  const DisplayLevels lv = levelsIn.normalised();
  const QImage src =
      (raw.format() == QImage::Format_Grayscale8 || raw.format() == QImage::Format_Grayscale16)
          ? raw
          : raw.convertToFormat(QImage::Format_Grayscale16);
  const bool wide = src.format() == QImage::Format_Grayscale16;
  const double full = wide ? 65535.0 : 255.0;
  const double lo = lv.black * full;
  const double scale = 255.0 / ((lv.white - lv.black) * full);
  QImage out(src.size(), QImage::Format_Grayscale8);
  if (!wide) {
    // A lookup table: 256 entries are cheaper than a multiply per pixel.
    std::array<uchar, 256> lut{};
    for (int v = 0; v < 256; ++v)
      lut[static_cast<size_t>(v)] =
          static_cast<uchar>(std::clamp(std::lround((v - lo) * scale), 0L, 255L));
    for (int y = 0; y < src.height(); ++y) {
      const uchar* in = src.constScanLine(y);
      uchar* o = out.scanLine(y);
      for (int x = 0; x < src.width(); ++x) o[x] = lut[in[x]];
    }
  } else {
    for (int y = 0; y < src.height(); ++y) {
      const auto* in = reinterpret_cast<const quint16*>(src.constScanLine(y));
      uchar* o = out.scanLine(y);
      for (int x = 0; x < src.width(); ++x)
        o[x] = static_cast<uchar>(std::clamp(std::lround((in[x] - lo) * scale), 0L, 255L));
    }
  }
  return out;
}

DisplayLevels autoLevels(const QImage& sampleIn, double lowPercentile, double highPercentile) {
  if (sampleIn.isNull()) return {};
  const QImage sample = (sampleIn.format() == QImage::Format_Grayscale8 ||
                         sampleIn.format() == QImage::Format_Grayscale16)
                            ? sampleIn
                            : sampleIn.convertToFormat(QImage::Format_Grayscale16);
  const bool wide = sample.format() == QImage::Format_Grayscale16;
  const double full = wide ? 65535.0 : 255.0;
  // A 4096-bin histogram: percentiles to 1/4096 of full scale are plenty for display.
  constexpr int kBins = 4096;
  std::vector<long> hist(kBins, 0);
  long n = 0;
  for (int y = 0; y < sample.height(); ++y) {
    const uchar* row = sample.constScanLine(y);
    for (int x = 0; x < sample.width(); ++x) {
      const double v = wide ? reinterpret_cast<const quint16*>(row)[x] : row[x];
      ++hist[static_cast<size_t>(std::min(kBins - 1, static_cast<int>(v / full * kBins)))];
      ++n;
    }
  }
  if (n == 0) return {};
  auto binAt = [&](double pct) {
    const long target = static_cast<long>(std::ceil(pct / 100.0 * static_cast<double>(n)));
    long acc = 0;
    for (int b = 0; b < kBins; ++b) {
      acc += hist[static_cast<size_t>(b)];
      if (acc >= std::max(1L, target)) return b;
    }
    return kBins - 1;
  };
  const int lo = binAt(lowPercentile);
  const int hi = binAt(highPercentile);
  return DisplayLevels{static_cast<double>(lo) / kBins, static_cast<double>(hi + 1) / kBins}
      .normalised();
}

}  // namespace budledger::ui
