#include "core/stats/distributions.h"

#include <cmath>
#include <limits>
#include <stdexcept>

namespace budledger::stats {

using Real = long double;

double normalUpperTail(double z) { return double(0.5L * std::erfc(Real(z) / std::sqrt(2.0L))); }

double normalQuantile(double p) {
  if (!(p > 0.0 && p < 1.0)) {
    if (p == 0.0) return -std::numeric_limits<double>::infinity();
    if (p == 1.0) return std::numeric_limits<double>::infinity();
    throw std::invalid_argument("normalQuantile: p outside [0, 1]");
  }
  // Work on the smaller tail so that precision is not lost near p = 1.
  const bool upper = p > 0.5;
  const Real q = upper ? 1.0L - Real(p) : Real(p);
  // Starting value: Abramowitz & Stegun 26.2.23 (error < 4.5e-4), then Newton
  // steps on the exact tail from erfc, which converge to full precision.
  Real t = std::sqrt(-2.0L * std::log(q));
  Real x = t - (2.515517L + 0.802853L * t + 0.010328L * t * t) /
                   (1.0L + 1.432788L * t + 0.189269L * t * t + 0.001308L * t * t * t);
  // x > 0 is the upper-tail point of probability q.
  for (int i = 0; i < 8; ++i) {
    Real tail = 0.5L * std::erfc(x / std::sqrt(2.0L));
    Real density =
        std::exp(-0.5L * x * x) / std::sqrt(2.0L * 3.14159265358979323846264338327950288L);
    Real step = (tail - q) / density;  // d tail / dx = -density
    // Halley correction: the curvature of the tail is x * density.
    step = step / (1.0L - 0.5L * x * step);
    x += step;
    if (std::fabs(step) <= 1e-19L * std::fmax(1.0L, std::fabs(x))) break;
  }
  return double(upper ? x : -x);
}

double twoSidedZ(double level) {
  if (!(level > 0.0 && level < 1.0)) throw std::invalid_argument("confidence level outside (0, 1)");
  return normalQuantile(1.0 - (1.0 - level) / 2.0);
}

namespace {

// Series for the lower regularised gamma P(s, x), good for x < s + 1.
Real gammaPSeries(Real s, Real x) {
  Real term = 1.0L / s, sum = term;
  for (int n = 1; n < 10000; ++n) {
    term *= x / (s + n);
    sum += term;
    if (std::fabs(term) < std::fabs(sum) * 1e-21L) break;
  }
  return sum * std::exp(-x + s * std::log(x) - std::lgamma(s));
}

// Continued fraction for Q(s, x) (modified Lentz), good for x >= s + 1.
Real gammaQFraction(Real s, Real x) {
  const Real tiny = std::numeric_limits<Real>::min() / std::numeric_limits<Real>::epsilon();
  Real b = x + 1.0L - s, c = 1.0L / tiny, d = 1.0L / b, h = d;
  for (int i = 1; i < 10000; ++i) {
    Real an = -i * (i - s);
    b += 2.0L;
    d = an * d + b;
    if (std::fabs(d) < tiny) d = tiny;
    c = b + an / c;
    if (std::fabs(c) < tiny) c = tiny;
    d = 1.0L / d;
    Real delta = d * c;
    h *= delta;
    if (std::fabs(delta - 1.0L) < 1e-21L) break;
  }
  return std::exp(-x + s * std::log(x) - std::lgamma(s)) * h;
}

}  // namespace

double regularizedGammaQ(double s, double x) {
  if (!(s > 0.0)) throw std::invalid_argument("regularizedGammaQ: s must be positive");
  if (std::isnan(x)) return x;
  if (x <= 0.0) return 1.0;
  if (std::isinf(x)) return 0.0;
  Real S = s, X = x;
  if (X < S + 1.0L) return double(1.0L - gammaPSeries(S, X));
  return double(gammaQFraction(S, X));
}

double chiSquareUpperTail(double x, double df) {
  if (!(df > 0.0)) throw std::invalid_argument("chiSquareUpperTail: df must be positive");
  if (x <= 0.0) return 1.0;
  // Exact forms for the common small df avoid any series error.
  if (df == 1.0) return double(std::erfc(std::sqrt(Real(x) / 2.0L)));
  if (df == 2.0) return double(std::exp(-Real(x) / 2.0L));
  return regularizedGammaQ(df / 2.0, x / 2.0);
}

}  // namespace budledger::stats
