#include "core/stats/gompertz.h"

#include <cmath>
#include <numbers>

namespace budledger::stats {

using Real = long double;

namespace {

// phi0(x) = (e^x − 1)/x, phi1(x) = (x e^x − e^x + 1)/x², phi2(x) = (x² e^x − 2x e^x + 2(e^x −
// 1))/x³: with x = a t, E = t·phi0 = ∫_0^t e^{a s} ds and its first two derivatives in a are
// t²·phi1 and t³·phi2. Series below |x| = 1, where the closed forms cancel.
struct Phi {
  Real f0, f1, f2;
};

Phi phi(Real x) {
  if (std::fabs(x) < 0.05L) {
    // f0 = Σ x^m/(m+1)!, f1 = Σ (m+1) x^m/(m+2)!, f2 = Σ (m+2)(m+1) x^m/(m+3)!
    Real f0 = 0.0L, f1 = 0.0L, f2 = 0.0L;
    Real xm = 1.0L;    // x^m
    Real fact = 1.0L;  // (m+1)!
    for (int m = 0; m < 40; ++m) {
      fact *= Real(m + 1);
      const Real t0 = xm / fact;
      const Real t1 = t0 * Real(m + 1) / Real(m + 2);
      const Real t2 = t1 * Real(m + 2) / Real(m + 3);
      f0 += t0;
      f1 += t1;
      f2 += t2;
      xm *= x;
      if (std::fabs(t0) < 1e-22L) break;
    }
    return {f0, f1, f2};
  }
  const Real em1 = std::expm1(x), ex = std::exp(x);
  return {em1 / x, (x * ex - em1) / (x * x),
          (x * x * ex - 2.0L * x * ex + 2.0L * em1) / (x * x * x)};
}

struct Sums {
  Real g0 = 0.0L, g1 = 0.0L, g2 = 0.0L;  // G(a), G'(a), G''(a)
};

Sums sums(const Tally& tally, Real a) {
  Sums s;
  for (const auto& c : tally) {
    if (c.time == 0) continue;
    const Real t = c.time, w = c.total();
    const Phi p = phi(a * t);
    s.g0 += w * t * p.f0;
    s.g1 += w * t * t * p.f1;
    s.g2 += w * t * t * t * p.f2;
  }
  return s;
}

}  // namespace

GompertzFit fitGompertz(const Tally& tally) {
  GompertzFit fit;
  Real d = 0.0L, deathTime = 0.0L, sumTime = 0.0L;
  int tmax = 0;
  for (const auto& c : tally) {
    fit.n += c.total();
    fit.events += c.events;
    d += c.events;
    deathTime += Real(c.events) * c.time;
    sumTime += Real(c.total()) * c.time;
    tmax = std::max(tmax, c.time);
  }
  if (fit.events == 0) {
    fit.problem = "no deaths";
    return fit;
  }
  if (deathTime == 0.0L) {
    fit.problem = "every death is at 0 divisions: the rate is unbounded below";
    return fit;
  }
  if (deathTime == d * tmax) {
    fit.problem = "every death is at the longest lifespan: the rate is unbounded";
    return fit;
  }
  // Profile score D(a) = T − d G'/G, strictly decreasing; D' = −d (G''G − G'²)/G².
  auto score = [&](Real a, Real& D, Real& dD) {
    const Sums s = sums(tally, a);
    D = deathTime - d * s.g1 / s.g0;
    dD = -d * (s.g2 * s.g0 - s.g1 * s.g1) / (s.g0 * s.g0);
  };
  // The natural unit of a is one over the mean lifespan.
  const Real unit = Real(fit.n) / sumTime;
  const Real limit = 5000.0L / Real(tmax);  // keeps e^{a t} inside long double
  Real lo = 0.0L, hi = 0.0L, D = 0.0L, dD = 0.0L;
  score(0.0L, D, dD);
  Real step = unit;
  int guard = 0;
  if (D > 0.0L) {
    do {
      lo = hi;
      hi = std::fmin(hi + step, limit);
      step *= 2.0L;
      score(hi, D, dD);
    } while (D > 0.0L && hi < limit && ++guard < 200);
    if (D > 0.0L) {
      fit.problem = "the rate is unbounded (hazard rising too steeply to fit)";
      return fit;
    }
  } else if (D < 0.0L) {
    do {
      hi = lo;
      lo = std::fmax(lo - step, -limit * 200.0L);
      step *= 2.0L;
      score(lo, D, dD);
    } while (D < 0.0L && lo > -limit * 200.0L && ++guard < 200);
    if (D < 0.0L) {
      fit.problem = "the rate is unbounded below (hazard falling too steeply to fit)";
      return fit;
    }
  }
  // Safeguarded Newton on D: concavity makes the root unique; the bracket makes it safe.
  Real a = lo == hi ? lo : (lo + hi) / 2.0L;
  int iter = 0;
  for (; iter < 300; ++iter) {
    score(a, D, dD);
    if (D == 0.0L) break;
    (D > 0.0L ? lo : hi) = a;
    Real next = a - D / dD;
    if (!(next > lo && next < hi)) next = (lo + hi) / 2.0L;
    const Real change = std::fabs(next - a);
    a = next;
    if (change <= 1e-18L * std::fmax(std::fabs(a), unit) || hi - lo <= 1e-18L * unit) break;
  }
  fit.iterations = iter + 1;

  const Sums s = sums(tally, a);
  const Real b = d / s.g0;
  const Real ll = d * std::log(b) + a * deathTime - b * s.g0;
  // Observed information in (a, b): [[b G'', G'], [G', d / b²]].
  const Real iaa = b * s.g2, iab = s.g1, ibb = d / (b * b);
  const Real det = iaa * ibb - iab * iab;
  if (!(det > 0.0L)) {
    fit.problem = "the information matrix is singular";
    return fit;
  }
  const Real vaa = ibb / det, vbb = iaa / det, vab = -iab / det;
  fit.estimable = true;
  fit.rate = double(a);
  fit.initialMortality = double(b);
  fit.rateStdErr = double(std::sqrt(vaa));
  fit.initialMortalityStdErr = double(std::sqrt(vbb));
  fit.covRateInitial = double(vab);
  if (a > 0.0L) {
    fit.doublingTime = double(std::numbers::ln2_v<Real> / a);
    fit.doublingTimeStdErr = double(std::numbers::ln2_v<Real> / (a * a) * std::sqrt(vaa));
  }
  fit.logLik = double(ll);
  fit.aic = double(-2.0L * ll + 4.0L);
  return fit;
}

GompertzProfilePoint gompertzProfile(const Tally& tally, double rate) {
  Real d = 0.0L, deathTime = 0.0L;
  for (const auto& c : tally) {
    d += c.events;
    deathTime += Real(c.events) * c.time;
  }
  const Sums s = sums(tally, rate);
  GompertzProfilePoint p;
  p.rate = rate;
  if (d == 0.0L || !(s.g0 > 0.0L)) return p;
  const Real b = d / s.g0;
  p.initialMortality = double(b);
  p.logLik = double(d * std::log(b) + Real(rate) * deathTime - d);
  return p;
}

double gompertzSurvival(double t, double rate, double initialMortality) {
  const Real x = Real(rate) * Real(t);
  return double(std::exp(-Real(initialMortality) * Real(t) * phi(x).f0));
}

double gompertzDensity(double t, double rate, double initialMortality) {
  return double(Real(initialMortality) * std::exp(Real(rate) * Real(t))) *
         gompertzSurvival(t, rate, initialMortality);
}

}  // namespace budledger::stats
