#include "demo/biology.h"

#include <algorithm>
#include <cmath>

#include "demo/detmath.h"

namespace budledger::demo {

int frameAt(double tMin, double intervalMin) {
  if (tMin <= 0.0) return 0;
  long long k = static_cast<long long>(std::ceil(tMin / intervalMin));
  // Guard the division's rounding so that k is exactly the first frame with k·I >= t.
  while (k > 0 && static_cast<double>(k - 1) * intervalMin >= tMin) --k;
  while (static_cast<double>(k) * intervalMin < tMin) ++k;
  return static_cast<int>(std::min<long long>(k, 1LL << 30));
}

int sampleLifespan(Rng& rng, double median, double shape) {
  const double a = shape;
  const double b = a * detmath::log(2.0) / (detmath::exp(a * median) - 1.0);
  double u = rng.uniform();
  while (u == 0.0) u = rng.uniform();
  // Inverse of S: T = ln(1 - (a/b) ln U) / a.
  const double t = detmath::log(1.0 - (a / b) * detmath::log(u)) / a;
  return static_cast<int>(std::floor(t + 0.5));
}

double meanCycleMin(const BiologyParams& b, int n, int lifespan) {
  double m = b.cycleMin * (1.0 + b.ageSlowdown * n);
  if (b.lateDivisions > 0) {
    // Cycle n ends with division n+1; the last `lateDivisions` cycles before death
    // lengthen quadratically up to (1 + lateSlowdown), the terminal cycle at the maximum.
    const int j = std::min(b.lateDivisions, n - (lifespan - b.lateDivisions) + 1);
    if (j > 0) {
      const double x = static_cast<double>(j) / b.lateDivisions;
      m *= 1.0 + b.lateSlowdown * x * x;
    }
  }
  return m;
}

DaughterPlace daughterPlace(const Division& d, double motherRadiusUm, double t) {
  const double dt = std::max(0.0, t - d.tSep);
  if (d.lodged) return {d.lodgeAngle, motherRadiusUm + d.daughterRadiusUm + 0.1};
  double angle = d.angle;
  if (d.upstream) angle += (d.angle > detmath::kPi ? 1.0 : -1.0) * std::min(1.3, 0.06 * dt);
  return {angle, motherRadiusUm + d.daughterRadiusUm + 0.3 + 0.15 * dt};
}

bool budSiteTaken(double budAngle, double budRadiusUm, const Division& other, double motherRadiusUm,
                  double t) {
  if (t < other.tSep || t >= other.tGone) return false;
  const DaughterPlace p = daughterPlace(other, motherRadiusUm, t);
  // The grown bud's centre sits 0.6 of its radius outside the mother's outline
  // (as drawn by the renderer); the daughter's at p.distUm.
  const double b = motherRadiusUm + 0.6 * budRadiusUm;
  const double dx = p.distUm * detmath::sin(p.angle) - b * detmath::sin(budAngle);
  const double dy = p.distUm * detmath::cos(p.angle) - b * detmath::cos(budAngle);
  const double reach = budRadiusUm + other.daughterRadiusUm;
  return dx * dx + dy * dy < reach * reach;
}

namespace {

Occupant simulateMother(const BiologyParams& b, bool initial, double tStart, double horizon,
                        double intervalMin, Rng& rng) {
  Occupant m;
  m.initial = initial;
  m.tStart = initial ? 0.0 : tStart;
  m.seed = rng.next();
  m.radiusUm = std::max(0.5 * b.motherDiameterUm * (1.0 + rng.normal(0.0, 0.04)), 1.6);
  m.lifespan = sampleLifespan(rng, b.medianRls, b.gompertzShape);

  // Phase of the cycle under way at capture. A mother at frame 0 is anywhere in
  // her cycle; a captured newborn has been free for part of her (longer) first G1.
  double cycleStart;
  bool firstIsNewborn;
  if (initial) {
    firstIsNewborn = false;
    const double d0 = rng.gammaMeanCv(meanCycleMin(b, 0, m.lifespan), b.cycleCv);
    cycleStart = -rng.uniform() * d0;
  } else {
    firstIsNewborn = true;
    cycleStart = tStart - rng.uniform(0.0, 0.3) * b.cycleMin * b.g1Fraction;
  }

  auto sideAngle = [&](bool upstream) {
    return upstream ? detmath::kPi + rng.normal(0.0, 0.5)  // around the inlet side
                    : rng.normal(0.0, 0.15);               // into the outlet gap
  };
  // A bud emerges where there is room: if a daughter still beside the mother
  // (lodged, or not yet carried off) holds the side drawn, the bud grows on the
  // other side; if both are held, it pushes the daughter on the drawn side away.
  auto budDirection = [&](Division& d) {
    d.upstream = rng.bernoulli(b.upstreamBudFraction);
    d.angle = sideAngle(d.upstream);
    const double r = m.radiusUm * detmath::cbrt(1.0 + b.volumeGrowth * d.age);
    auto taken = [&](double angle) {
      return std::any_of(m.divisions.begin(), m.divisions.end(), [&](const Division& o) {
        return budSiteTaken(angle, d.daughterRadiusUm, o, r, d.tBud);
      });
    };
    if (!taken(d.angle)) return;
    const bool drawnUpstream = d.upstream;
    const double drawnAngle = d.angle;
    d.upstream = !drawnUpstream;
    d.angle = sideAngle(d.upstream);
    if (!taken(d.angle)) return;
    d.upstream = drawnUpstream;
    d.angle = drawnAngle;
    for (auto& o : m.divisions)
      if (budSiteTaken(d.angle, d.daughterRadiusUm, o, r, d.tBud)) o.tGone = d.tBud;
  };
  auto daughterFate = [&](Division& d) {
    if (rng.bernoulli(b.lodgeProbability)) {
      d.lodged = true;
      d.tGone = d.tSep + rng.exponential(b.lodgeMin);
      const double side = rng.bernoulli(0.5) ? 1.0 : -1.0;
      d.lodgeAngle = d.upstream ? side * rng.uniform(1.9, 2.5) : rng.normal(0.0, 0.1);
    } else {
      d.tGone = d.tSep + (b.lingerMin > 0 ? rng.exponential(b.lingerMin) : 0.0);
    }
  };

  // Divisions until the lifespan is spent or the movie is over.
  int n = 0;
  for (; n < m.lifespan && cycleStart < horizon; ++n) {
    Division d;
    d.age = n;
    d.cycleStart = cycleStart;
    const double dur = rng.gammaMeanCv(meanCycleMin(b, n, m.lifespan), b.cycleCv);
    const double budded = (1.0 - b.g1Fraction) * dur;
    const double g1 =
        b.g1Fraction * dur + (firstIsNewborn && n == 0 ? (b.firstCycleFactor - 1.0) * dur : 0.0);
    d.tBud = cycleStart + g1;
    d.tSep = d.tBud + budded;
    d.daughterRadiusUm = m.radiusUm * b.daughterRatio * (1.0 + rng.normal(0.0, 0.05));
    budDirection(d);
    daughterFate(d);
    m.divisions.push_back(d);
    cycleStart = d.tSep;
  }

  // Death after the last division: arrested unbudded in G1, or with a last bud
  // that never separates.
  if (n == m.lifespan && cycleStart < horizon) {
    const double dur = rng.gammaMeanCv(meanCycleMin(b, n, m.lifespan), b.cycleCv);
    if (rng.bernoulli(b.finalBudProbability)) {
      Division d;
      d.age = n;
      d.cycleStart = cycleStart;
      d.tBud = cycleStart + b.g1Fraction * dur;
      d.tSep = kNever;
      d.daughterRadiusUm = m.radiusUm * b.daughterRatio;
      budDirection(d);
      m.divisions.push_back(d);
      m.tDeath = d.tBud + rng.uniform(0.4, 0.9) * (1.0 - b.g1Fraction) * dur;
    } else {
      m.tDeath = cycleStart + rng.uniform(0.5, 1.0) * dur;
    }
  }

  // Washout competes with death: the first to happen decides.
  const double tWash =
      b.washoutPerHour > 0 ? m.tStart + rng.exponential(60.0 / b.washoutPerHour) : kNever;
  if (tWash < m.tDeath) {
    m.tEnd = tWash;
    m.washedOut = true;
    m.tDeath = kNever;
  } else if (m.tDeath < kNever) {
    if (!rng.bernoulli(b.corpseStayProbability)) {
      // A flushed corpse must be seen dead for at least one frame.
      const double seenDead = (frameAt(m.tDeath, intervalMin) + 1) * intervalMin + 0.5;
      m.tEnd = std::max(m.tDeath + rng.exponential(b.corpseFlushMin), seenDead);
    }
    if (rng.bernoulli(0.1)) {
      m.lyses = true;
      m.tLysis = m.tDeath + rng.uniform(180.0, 900.0);
    }
  }
  return m;
}

}  // namespace

TrapLife simulateTrap(const BiologyParams& b, int frames, double intervalMin, double cupRadiusUm,
                      Rng rng) {
  TrapLife life;
  const double horizon = frames * intervalMin;
  const double maxRadius = cupRadiusUm - 0.15;
  double tFree = 0.0;  // the trap is free from this time on
  if (rng.bernoulli(b.initialOccupancy)) {
    life.occupants.push_back(simulateMother(b, true, 0.0, horizon, intervalMin, rng));
    tFree = life.occupants.back().tEnd;
  }
  while (tFree < horizon && b.arrivalPerHour > 0) {
    double tArr = tFree + rng.exponential(60.0 / b.arrivalPerHour);
    // The cup is seen empty for at least one frame before the next mother sits.
    tArr = std::max(tArr, frameAt(tFree, intervalMin) * intervalMin + 0.5);
    if (tArr >= horizon) break;
    life.occupants.push_back(simulateMother(b, false, tArr, horizon, intervalMin, rng));
    tFree = life.occupants.back().tEnd;
  }
  for (auto& m : life.occupants) m.radiusUm = std::min(m.radiusUm, maxRadius);

  // Passing cells that get stuck on top of an occupied cup (a Poisson process; only
  // drawn while a mother is there).
  if (b.stuckPerHour > 0) {
    double t = rng.exponential(60.0 / b.stuckPerHour);
    while (t < horizon) {
      StuckCell s;
      s.tStart = t;
      s.tEnd = t + rng.exponential(b.stuckMin);
      s.angle = detmath::kPi + rng.normal(0.0, 0.35);
      s.radiusUm = 0.5 * b.motherDiameterUm * rng.uniform(0.75, 1.0);
      s.seed = rng.next();
      life.stuck.push_back(s);
      t = s.tEnd + rng.exponential(60.0 / b.stuckPerHour);
    }
  }
  return life;
}

}  // namespace budledger::demo
