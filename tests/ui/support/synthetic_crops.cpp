#include "synthetic_crops.h"

#include <QThread>
#include <algorithm>
#include <cmath>

namespace budledger::testsupport {

SyntheticCrops::SyntheticCrops(const std::vector<Event>& events, int delayMs) : delayMs_(delayMs) {
  for (const auto& e : events) byTrap_[{e.position, e.trap}].push_back(e);
  for (auto& [t, list] : byTrap_)
    std::sort(list.begin(), list.end(), [](auto& a, auto& b) { return a.frame < b.frame; });
}

QImage SyntheticCrops::crop(ui::TrapId trap, int frame) const {
  if (delayMs_ > 0) QThread::msleep(static_cast<unsigned long>(delayMs_));
  const QSize sz = cropSize();
  QImage img(sz, QImage::Format_Grayscale16);
  // State at this frame from the events: mother present? bud size?
  bool mother = true, dead = false;
  double bud = 0;
  auto it = byTrap_.find(trap);
  if (it != byTrap_.end()) {
    const auto& list = it->second;
    if (!list.empty() && list.front().kind == EventKind::Arrival) mother = false;
    int budFrame = -1;
    for (const auto& e : list) {
      if (e.frame > frame) {
        if (budFrame >= 0 && e.kind == EventKind::Separation)
          bud = std::min(1.0, (frame - budFrame + 1.0) / (e.frame - budFrame + 1.0));
        break;
      }
      switch (e.kind) {
        case EventKind::Arrival:
          mother = true;
          break;
        case EventKind::Bud:
          budFrame = e.frame;
          break;
        case EventKind::Separation:
          budFrame = -1;
          break;
        case EventKind::Death:
          dead = true;
          break;
        case EventKind::Washout:
          mother = false;
          break;
      }
    }
    if (budFrame >= 0 && bud == 0) bud = 0.5;
  }
  const double mx = sz.width() / 2.0, my = sz.height() * 0.68, mr = 11;
  const double br = 3 + 6 * bud, bx = mx, by = my - mr - br + 1;
  for (int y = 0; y < sz.height(); ++y) {
    auto* row = reinterpret_cast<quint16*>(img.scanLine(y));
    for (int x = 0; x < sz.width(); ++x) {
      double v = 26000;
      // The cup: two dark pillars and a floor, like a trap seen from above.
      if ((x < 8 || x >= sz.width() - 8) && y > sz.height() * 0.35) v = 9000;
      if (y >= sz.height() - 6) v = 9000;
      auto ring = [&](double cx, double cy, double r) {
        const double d = std::hypot(x - cx, y - cy);
        if (d < r - 2)
          v = dead ? 20000 : 38000;
        else if (d < r + 1)
          v = 7000;
      };
      if (mother) {
        ring(mx, my, mr);
        if (bud > 0) ring(bx, by, br);
      }
      // Seeded speckle so the strips do not look flat.
      const unsigned h = static_cast<unsigned>(x * 73856093u ^ y * 19349663u ^
                                               static_cast<unsigned>(frame) * 83492791u);
      v += static_cast<double>(h % 2000) - 1000;
      row[x] = static_cast<quint16>(std::clamp(v, 0.0, 65535.0));
    }
  }
  return img;
}

}  // namespace budledger::testsupport
