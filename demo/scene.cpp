#include "demo/scene.h"

#include <algorithm>
#include <cmath>

#include "demo/detmath.h"

namespace budledger::demo {
namespace {

Vec2 unit(double angle) { return {detmath::sin(angle), detmath::cos(angle)}; }  // (u, v)

// Bud radius: volume grows linearly from the visible size to the final size.
double budRadius(double rFinal, double rVisible, double x) {
  x = std::clamp(x, 0.0, 1.0);
  const double s0 = std::min(1.0, (rVisible * rVisible * rVisible) / (rFinal * rFinal * rFinal));
  return rFinal * detmath::cbrt(s0 + (1.0 - s0) * x);
}

}  // namespace

SceneBuilder::SceneBuilder(const Device& device, const std::vector<TrapLife>& lives,
                           const BiologyParams& bio, double intervalMin, Rng rng)
    : device_(device), lives_(lives), bio_(bio), interval_(intervalMin), rng_(rng) {
  const auto& p = device.params();
  // The widest mother a cup can hold.
  maxRadiusUm_ = p.postShape == "arc" ? 0.5 * p.inletUm + 0.15 : 0.5 * p.inletUm - 0.1;
}

CellBody SceneBuilder::body(const Trap& trap, Vec2 drift, double u, double v,
                            double radiusUm) const {
  CellBody c;
  c.centre = device_.toImage(trap, u, v) + drift;
  c.semiMajor = c.semiMinor = radiusUm * device_.pxPerUm();
  c.axis = device_.across();
  c.thickness = 2.0 * radiusUm;
  c.vacuole = 0.18;
  c.granules = 0.06;
  return c;
}

void SceneBuilder::addTrap(const Trap& trap, const TrapLife& life, int frame, double t, Vec2 drift,
                           std::vector<CellBody>& out) const {
  const Occupant* m = nullptr;
  for (const auto& o : life.occupants)
    if (t >= o.tStart && t < o.tEnd) {
      m = &o;
      break;
    }
  if (!m) return;
  Rng wob = rng_.derive(
      "wobble", (static_cast<std::uint64_t>(trap.id) << 32) | static_cast<std::uint64_t>(frame));

  int age = 0;
  for (const auto& d : m->divisions)
    if (d.tSep <= t) ++age;
  const bool dead = t >= m->tDeath;
  const double deadness = dead ? 1.0 - detmath::exp(-(t - m->tDeath) / 90.0) : 0.0;
  double r = m->radiusUm * detmath::cbrt(1.0 + bio_.volumeGrowth * age);
  r = std::min(r, maxRadiusUm_);
  if (dead) r *= 1.0 + bio_.deathEnlarge * (1.0 - detmath::exp(-(t - m->tDeath) / 240.0));
  r = std::min(r, maxRadiusUm_ + 0.2);
  const double mu = wob.normal(0.0, 0.06);
  const double mv = device_.seatV(r) + wob.normal(0.0, 0.05);

  CellBody mother = body(trap, drift, mu, mv, r);
  mother.seed = m->seed;
  mother.spin = 0.002 * t + wob.normal(0.0, 0.02);
  if (dead) {
    const bool ghost = t >= m->tLysis;
    mother.thickness *= ghost ? 0.35 : 1.0 - 0.35 * deadness;
    mother.absorb = ghost ? 0.02 : 0.22 * deadness;
    mother.granules = 0.05 + 0.45 * deadness;
    mother.vacuole = 0.25 * (1.0 - deadness);
  }
  out.push_back(mother);

  const double gap = 0.5 * device_.params().outletUm;
  for (const auto& d : m->divisions) {
    if (t < d.tBud || t >= d.tGone) continue;
    if (t < d.tSep) {
      // Attached bud, growing over the budded part of the cycle.
      const double span =
          d.tSep == kNever ? (1.0 - bio_.g1Fraction) * bio_.cycleMin : d.tSep - d.tBud;
      const double rb = budRadius(d.daughterRadiusUm, 0.5 * bio_.budVisibleUm, (t - d.tBud) / span);
      const Vec2 dir = unit(d.angle + wob.normal(0.0, 0.03));
      double across = rb, along = rb;
      if (!d.upstream && rb > gap + 0.1) {  // squeezed into the outlet gap
        across = gap + 0.1;
        along = rb * rb / across;
      }
      const double dist = r + 0.6 * along;
      CellBody bud = body(trap, drift, mu + dist * dir.x, mv + dist * dir.y, across);
      bud.semiMajor = along * device_.pxPerUm();
      bud.axis = (dir.x) * device_.across() + (dir.y) * device_.downstream();
      bud.thickness = 2.0 * across;
      bud.seed = m->seed ^ static_cast<std::uint64_t>(d.age + 1) * 0x9e3779b97f4a7c15ULL;
      bud.vacuole = 0.0;
      if (dead) {
        bud.absorb = 0.15 * deadness;
        bud.granules = 0.05 + 0.3 * deadness;
        bud.thickness *= 1.0 - 0.3 * deadness;
      }
      out.push_back(bud);
      continue;
    }
    // Separated daughter still in view: carried away, or lodged beside the mother.
    const double rd = d.daughterRadiusUm;
    const DaughterPlace place = daughterPlace(d, r, t);
    const double dist = place.distUm;
    const Vec2 dir = unit(place.angle);
    double across = rd, along = rd;
    const double v = mv + dist * dir.y;
    if (!d.upstream && !d.lodged && v < device_.params().wallUm + rd && rd > gap + 0.1) {
      across = gap + 0.1;
      along = rd * rd / across;
    }
    CellBody dau = body(trap, drift, mu + dist * dir.x, v, across);
    dau.semiMajor = along * device_.pxPerUm();
    dau.axis = dir.x * device_.across() + dir.y * device_.downstream();
    dau.seed = m->seed ^ static_cast<std::uint64_t>(d.age + 1) * 0x9e3779b97f4a7c15ULL;
    dau.vacuole = 0.1;
    out.push_back(dau);
  }

  for (const auto& s : life.stuck) {
    if (t < s.tStart || t >= s.tEnd) continue;
    const Vec2 dir = unit(s.angle);
    const double dist = r + s.radiusUm - 0.1;
    CellBody c = body(trap, drift, mu + dist * dir.x, mv + dist * dir.y, s.radiusUm);
    c.seed = s.seed;
    out.push_back(c);
  }
}

void SceneBuilder::addDrifters(int frame, Vec2 drift, std::vector<CellBody>& out) const {
  if (bio_.driftersPerFrame <= 0) return;
  Rng r = rng_.derive("drifters", static_cast<std::uint64_t>(frame));
  const int n = r.poisson(bio_.driftersPerFrame);
  const double ppu = device_.pxPerUm();
  for (int i = 0; i < n; ++i) {
    // A passing cell, away from the cups, smeared along the flow by its motion
    // during the exposure.
    Vec2 p;
    bool ok = false;
    for (int tries = 0; tries < 8 && !ok; ++tries) {
      p = {r.uniform(0.0, device_.width()), r.uniform(0.0, device_.height())};
      ok = true;
      for (const auto& t : device_.traps()) {
        const Vec2 d = p - t.seatPx;
        if (dot(d, d) < (7.0 * ppu) * (7.0 * ppu)) {
          ok = false;
          break;
        }
      }
    }
    if (!ok) continue;
    const double radius = 0.5 * bio_.motherDiameterUm * r.uniform(0.7, 1.0);
    const double smear = r.uniform(1.0, 3.5);
    CellBody c;
    c.centre = p + drift;
    c.semiMinor = radius * ppu;
    c.semiMajor = radius * smear * ppu;
    c.axis = device_.downstream();
    c.thickness = 2.0 * radius / smear;
    c.seed = r.next();
    c.vacuole = 0.0;
    c.granules = 0.0;
    out.push_back(c);
  }
}

void SceneBuilder::build(int frame, Vec2 drift, std::vector<CellBody>& out) const {
  const double t = frame * interval_;
  const auto& traps = device_.traps();
  for (std::size_t i = 0; i < traps.size(); ++i) addTrap(traps[i], lives_[i], frame, t, drift, out);
  addDrifters(frame, drift, out);
}

}  // namespace budledger::demo
