#include "core/stats/weibull.h"

#include <cmath>

namespace budledger::stats {

using Real = long double;

namespace {

struct Point {
  Real logt;
  Real events;
  Real total;
};

// h(k) = Σ w log t / Σ w − 1/k − mean log t over deaths, with w = count · t^k:
// the profile score for the shape, up to the factor d. Strictly increasing.
struct ShapeScore {
  const std::vector<Point>& pts;
  Real logtMax, meanLogDeath;

  void eval(Real k, Real& h, Real& dh) const {
    Real sw = 0.0L, swl = 0.0L, swll = 0.0L;
    for (const auto& p : pts) {
      const Real w = p.total * std::exp(k * (p.logt - logtMax));
      sw += w;
      swl += w * p.logt;
      swll += w * p.logt * p.logt;
    }
    const Real m = swl / sw;
    h = m - 1.0L / k - meanLogDeath;
    dh = std::fmax(swll / sw - m * m, 0.0L) + 1.0L / (k * k);
  }
};

}  // namespace

WeibullFit fitWeibull(const Tally& tally) {
  WeibullFit fit;
  std::vector<Point> pts;
  Real d = 0.0L, sumLogDeath = 0.0L, logtMax = 0.0L, logtMin = 0.0L;
  for (const auto& c : tally) {
    if (c.time <= 0) {
      fit.excludedAtZero += c.total();
      continue;
    }
    const Real lt = std::log(Real(c.time));
    if (pts.empty()) logtMin = lt;
    pts.push_back({lt, Real(c.events), Real(c.total())});
    logtMax = lt;  // tallies are ascending
    fit.n += c.total();
    fit.events += c.events;
    d += c.events;
    sumLogDeath += Real(c.events) * lt;
  }
  if (fit.events == 0) {
    fit.problem = "no deaths (lifespans of 0 divisions left out)";
    return fit;
  }
  if (logtMax == logtMin) {
    fit.problem = "all lifespans are equal";
    return fit;
  }
  const Real meanLogDeath = sumLogDeath / d;
  bool deathsOnlyAtMax = true;
  for (const auto& p : pts) {
    if (p.events > 0.0L && p.logt != logtMax) deathsOnlyAtMax = false;
  }
  if (deathsOnlyAtMax) {
    fit.problem = "every death is at the longest lifespan: the shape is unbounded";
    return fit;
  }

  ShapeScore score{pts, logtMax, meanLogDeath};
  // Bracket the root of h, then safeguarded Newton.
  Real lo = 1.0L, hi = 1.0L, h = 0.0L, dh = 0.0L;
  score.eval(1.0L, h, dh);
  int guard = 0;
  if (h < 0.0L) {
    do {
      lo = hi;
      hi *= 2.0L;
      score.eval(hi, h, dh);
    } while (h < 0.0L && ++guard < 200);
  } else {
    do {
      hi = lo;
      lo /= 2.0L;
      score.eval(lo, h, dh);
    } while (h > 0.0L && ++guard < 200);
  }
  if (guard >= 200) {
    fit.problem = "the shape could not be bracketed";
    return fit;
  }
  Real k = (lo + hi) / 2.0L;
  int iter = 0;
  for (; iter < 200; ++iter) {
    score.eval(k, h, dh);
    if (h == 0.0L) break;
    (h < 0.0L ? lo : hi) = k;
    Real next = k - h / dh;
    if (!(next > lo && next < hi)) next = (lo + hi) / 2.0L;
    const Real change = std::fabs(next - k);
    k = next;
    if (change <= 1e-17L * k || hi - lo <= 1e-17L * k) break;
  }
  fit.iterations = iter + 1;

  // Scale from the profile: scale^k = Σ count · t^k / d.
  Real sw = 0.0L;
  for (const auto& p : pts) sw += p.total * std::exp(k * (p.logt - logtMax));
  const Real mu = logtMax + std::log(sw / d) / k;  // log scale
  const Real sigma = 1.0L / k;

  // Log-likelihood and observed information in (mu, log sigma), z = (log t − mu)/sigma.
  Real ll = 0.0L, A = 0.0L, B = 0.0L, C = 0.0L, zDeath = 0.0L;
  for (const auto& p : pts) {
    const Real z = (p.logt - mu) / sigma;
    const Real ez = std::exp(z);
    A += p.total * ez;
    B += p.total * z * ez;
    C += p.total * z * z * ez;
    zDeath += p.events * z;
    ll += p.events * (z - std::log(sigma) - p.logt) - p.total * ez;
  }
  const Real imm = A / (sigma * sigma);
  const Real imt = (A - d) / sigma + B / sigma;
  const Real itt = -zDeath + B + C;
  const Real det = imm * itt - imt * imt;
  if (!(det > 0.0L)) {
    fit.problem = "the information matrix is singular";
    return fit;
  }
  const Real vmm = itt / det, vtt = imm / det, vmt = -imt / det;

  fit.estimable = true;
  fit.shape = double(k);
  fit.scale = double(std::exp(mu));
  fit.logScale = double(mu);
  fit.logSigma = double(std::log(sigma));
  fit.logScaleStdErr = double(std::sqrt(vmm));
  fit.logSigmaStdErr = double(std::sqrt(vtt));
  fit.covLogScaleLogSigma = double(vmt);
  fit.shapeStdErr = double(k * std::sqrt(vtt));
  fit.scaleStdErr = double(std::exp(mu) * std::sqrt(vmm));
  fit.logLik = double(ll);
  fit.aic = double(-2.0L * ll + 4.0L);
  return fit;
}

}  // namespace budledger::stats
