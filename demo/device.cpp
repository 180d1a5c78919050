#include "demo/device.h"

#include <algorithm>
#include <cmath>

#include "demo/detmath.h"

namespace budledger::demo {
namespace {

double boxDistance(double u, double v, double u0, double u1, double v0, double v1) {
  const double cu = 0.5 * (u0 + u1), cv = 0.5 * (v0 + v1);
  const double hu = 0.5 * (u1 - u0), hv = 0.5 * (v1 - v0);
  const double qu = std::fabs(u - cu) - hu, qv = std::fabs(v - cv) - hv;
  const double ou = std::max(qu, 0.0), ov = std::max(qv, 0.0);
  return std::sqrt(ou * ou + ov * ov) + std::min(std::max(qu, qv), 0.0);
}

Vec2 flowVector(const std::string& flow) {
  if (flow == "up") return {0.0, -1.0};
  if (flow == "left") return {-1.0, 0.0};
  if (flow == "right") return {1.0, 0.0};
  return {0.0, 1.0};
}

}  // namespace

Device::Device(const DeviceParams& params, double referenceRadiusUm, Rng rng) : p_(params) {
  down_ = flowVector(p_.flow);
  across_ = {down_.y, -down_.x};

  const double g = p_.outletUm, w = p_.inletUm, depth = p_.cupDepthUm;
  // Circle through the lips (±g/2, 0) and the inlet tips (±w/2, -depth).
  arcCentreV_ = -(depth * depth + (w * w - g * g) / 4.0) / (2.0 * depth);
  arcRadius_ = std::sqrt(g * g / 4.0 + arcCentreV_ * arcCentreV_);

  // Pillars along the same circle, the first touching the lip, spaced so that
  // gaps between them stay far narrower than a cell.
  pillarRadius_ = std::max(0.6, 0.5 * p_.wallUm + 0.2);
  const double ringR = arcRadius_ + pillarRadius_;
  const double sinFirst = std::min(1.0, (g / 2.0 + pillarRadius_) / ringR);
  const double first = detmath::atan2(sinFirst, std::sqrt(1.0 - sinFirst * sinFirst));
  const double last = detmath::atan2(w / 2.0, -depth - arcCentreV_);
  const double pitch = 2.0 * pillarRadius_ + 0.45;
  const int n = 1 + static_cast<int>(std::ceil(std::max(0.0, last - first) * ringR / pitch));
  for (int i = 0; i < n; ++i) {
    const double th = n == 1 ? first : first + (last - first) * i / (n - 1);
    pillars_.push_back({ringR * detmath::sin(th), arcCentreV_ + ringR * detmath::cos(th)});
  }

  // Lattice of seats in µm, then shifted so the leftmost/topmost post sits one margin in.
  const double seatDown = -seatV(referenceRadiusUm);  // seat lies this far upstream of origin
  std::vector<Vec2> seatsUm;
  for (int r = 0; r < p_.rows; ++r)
    for (int c = 0; c < p_.cols; ++c)
      seatsUm.push_back(
          {c * p_.pitchXUm + ((r % 2) ? p_.stagger * p_.pitchXUm : 0.0), r * p_.pitchYUm});
  // Extent of one trap around its seat, in image axes.
  double minX = 1e300, minY = 1e300, maxX = -1e300, maxY = -1e300;
  for (double su : {-extentU(), extentU()})
    for (double sv : {-extentVUp(), extentVDown() + 3.5}) {  // room for buds below the outlet
      const double vx = su * across_.x + (sv + seatDown) * down_.x;
      const double vy = su * across_.y + (sv + seatDown) * down_.y;
      for (const auto& s : seatsUm) {
        minX = std::min(minX, s.x + vx);
        maxX = std::max(maxX, s.x + vx);
        minY = std::min(minY, s.y + vy);
        maxY = std::max(maxY, s.y + vy);
      }
    }
  const double ppu = pxPerUm();
  width_ = p_.widthPx > 0 ? p_.widthPx
                          : static_cast<int>(std::ceil((maxX - minX + 2 * p_.marginUm) * ppu));
  height_ = p_.heightPx > 0 ? p_.heightPx
                            : static_cast<int>(std::ceil((maxY - minY + 2 * p_.marginUm) * ppu));
  // Centre the lattice in the image.
  const double offX = 0.5 * (width_ / ppu - (maxX - minX)) - minX;
  const double offY = 0.5 * (height_ / ppu - (maxY - minY)) - minY;

  int id = 0;
  for (int r = 0; r < p_.rows; ++r)
    for (int c = 0; c < p_.cols; ++c, ++id) {
      const Vec2 s = seatsUm[static_cast<std::size_t>(id)];
      const double jx = p_.postJitterUm > 0 ? rng.normal(0.0, p_.postJitterUm) : 0.0;
      const double jy = p_.postJitterUm > 0 ? rng.normal(0.0, p_.postJitterUm) : 0.0;
      Trap t;
      t.id = id;
      t.row = r;
      t.col = c;
      const Vec2 seatUm{s.x + offX + jx, s.y + offY + jy};
      t.seatPx = ppu * seatUm;
      t.originPx = ppu * (seatUm + seatDown * down_);
      traps_.push_back(t);
    }
}

Vec2 Device::toImage(const Trap& t, double uUm, double vUm) const {
  const double ppu = pxPerUm();
  return t.originPx + (ppu * uUm) * across_ + (ppu * vUm) * down_;
}

double Device::seatV(double radiusUm) const {
  const double half = 0.5 * p_.outletUm;
  const double r = std::max(radiusUm, half + 0.05);
  return -std::sqrt(r * r - half * half);
}

double Device::extentU() const {
  switch (p_.postShape[0]) {
    case 'p':
      return 0.5 * p_.inletUm + 2.0 * pillarRadius_ + 0.5;
    case 'b':
      return 0.5 * p_.inletUm + p_.wallUm + 0.5;
    default:
      return arcRadius_ + p_.wallUm + 0.5;
  }
}
double Device::extentVUp() const { return p_.cupDepthUm + pillarRadius_ + 0.8; }
double Device::extentVDown() const {
  return std::max(p_.wallUm, arcCentreV_ + arcRadius_ + p_.wallUm) + 0.8;
}

double Device::arcDistance(double u, double v) const {
  const double du = u, dv = v - arcCentreV_;
  const double ring =
      std::fabs(std::sqrt(du * du + dv * dv) - (arcRadius_ + 0.5 * p_.wallUm)) - 0.5 * p_.wallUm;
  const double inletCut = -p_.cupDepthUm - v;              // > 0 upstream of the inlet line
  const double gapCut = 0.5 * p_.outletUm - std::fabs(u);  // > 0 inside the outlet gap
  return std::max(ring, std::max(inletCut, gapCut));
}

double Device::pillarDistance(double u, double v) const {
  const double au = std::fabs(u);
  double d = 1e300;
  for (const auto& c : pillars_) {
    const double du = au - c.x, dv = v - c.y;
    d = std::min(d, std::sqrt(du * du + dv * dv) - pillarRadius_);
  }
  return d;
}

double Device::blockDistance(double u, double v) const {
  const double au = std::fabs(u);
  const double half = 0.5 * p_.inletUm, wall = p_.wallUm;
  const double side = boxDistance(au, v, half, half + wall, -p_.cupDepthUm, wall);
  const double floor = boxDistance(au, v, 0.5 * p_.outletUm, half + wall, 0.0, wall);
  return std::min(side, floor);
}

double Device::postDistance(double u, double v) const {
  switch (p_.postShape[0]) {
    case 'p':
      return pillarDistance(u, v);
    case 'b':
      return blockDistance(u, v);
    default:
      return arcDistance(u, v);
  }
}

void Device::renderPosts(std::vector<float>& canvas, int cw, int ch, int offset) const {
  const double upp = p_.pixelUm;
  const double edge = std::max(p_.postEdgeUm, 0.5 * upp);
  const double eu = extentU(), evUp = extentVUp(), evDown = extentVDown();
  for (const auto& t : traps_) {
    // Bounding box of the trap in canvas pixels.
    double x0 = 1e300, y0 = 1e300, x1 = -1e300, y1 = -1e300;
    for (double su : {-eu, eu})
      for (double sv : {-evUp, evDown}) {
        const Vec2 q = toImage(t, su, sv);
        x0 = std::min(x0, q.x);
        x1 = std::max(x1, q.x);
        y0 = std::min(y0, q.y);
        y1 = std::max(y1, q.y);
      }
    const int ix0 = std::max(0, static_cast<int>(std::floor(x0)) + offset);
    const int iy0 = std::max(0, static_cast<int>(std::floor(y0)) + offset);
    const int ix1 = std::min(cw - 1, static_cast<int>(std::ceil(x1)) + offset);
    const int iy1 = std::min(ch - 1, static_cast<int>(std::ceil(y1)) + offset);
    for (int y = iy0; y <= iy1; ++y)
      for (int x = ix0; x <= ix1; ++x) {
        const Vec2 d{(x - offset) - t.originPx.x, (y - offset) - t.originPx.y};
        const double u = dot(d, across_) * upp, v = dot(d, down_) * upp;
        const double s = postDistance(u, v);
        double k = std::clamp(0.5 - s / edge, 0.0, 1.0);
        k = k * k * (3.0 - 2.0 * k);
        float& px = canvas[static_cast<std::size_t>(y) * static_cast<std::size_t>(cw) +
                           static_cast<std::size_t>(x)];
        px = std::max(px, static_cast<float>(k));
      }
  }
}

}  // namespace budledger::demo
