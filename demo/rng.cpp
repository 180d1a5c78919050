#include "demo/rng.h"

#include <cmath>

#include "demo/detmath.h"

namespace budledger::demo {
namespace {

std::uint64_t rotl(std::uint64_t x, int k) { return (x << k) | (x >> (64 - k)); }

// FNV-1a: a fixed, portable hash of a stream tag.
std::uint64_t hashTag(std::string_view tag) {
  std::uint64_t h = 1469598103934665603ULL;
  for (char c : tag) {
    h ^= static_cast<unsigned char>(c);
    h *= 1099511628211ULL;
  }
  return h;
}

}  // namespace

std::uint64_t splitmix64(std::uint64_t& state) {
  std::uint64_t z = (state += 0x9e3779b97f4a7c15ULL);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

Rng::Rng(std::uint64_t seed) : seed_(seed) {
  std::uint64_t sm = seed;
  for (auto& w : s_) w = splitmix64(sm);
}

Rng Rng::derive(std::string_view tag, std::uint64_t index) const {
  std::uint64_t sm = seed_ ^ hashTag(tag);
  std::uint64_t mixed = splitmix64(sm);
  sm = mixed ^ (index * 0xd1b54a32d192ed03ULL);
  return Rng(splitmix64(sm));
}

std::uint64_t Rng::next() {
  const std::uint64_t result = rotl(s_[1] * 5, 7) * 9;
  const std::uint64_t t = s_[1] << 17;
  s_[2] ^= s_[0];
  s_[3] ^= s_[1];
  s_[1] ^= s_[2];
  s_[0] ^= s_[3];
  s_[2] ^= t;
  s_[3] = rotl(s_[3], 45);
  return result;
}

double Rng::uniform() { return static_cast<double>(next() >> 11) * 0x1.0p-53; }

double Rng::uniform(double lo, double hi) { return lo + (hi - lo) * uniform(); }

bool Rng::bernoulli(double p) { return uniform() < p; }

int Rng::uniformInt(int lo, int hiInclusive) {
  if (hiInclusive <= lo) return lo;
  const auto span = static_cast<std::uint64_t>(hiInclusive - lo) + 1;
  // Lemire-free simple rejection keeps the result exactly uniform.
  const std::uint64_t limit = UINT64_MAX - UINT64_MAX % span;
  std::uint64_t x = next();
  while (x >= limit) x = next();
  return lo + static_cast<int>(x % span);
}

double Rng::normal() {
  if (haveSpare_) {
    haveSpare_ = false;
    return spare_;
  }
  double u, v, s;
  do {
    u = 2.0 * uniform() - 1.0;
    v = 2.0 * uniform() - 1.0;
    s = u * u + v * v;
  } while (s >= 1.0 || s == 0.0);
  const double f = std::sqrt(-2.0 * detmath::log(s) / s);
  spare_ = v * f;
  haveSpare_ = true;
  return u * f;
}

double Rng::exponential(double mean) {
  double u = uniform();
  while (u == 0.0) u = uniform();
  return -mean * detmath::log(u);
}

double Rng::gamma(double shape, double scale) {
  if (shape < 1.0) {
    // Boost a shape below one: G(a) = G(a+1) * U^(1/a).
    double u = uniform();
    while (u == 0.0) u = uniform();
    return gamma(shape + 1.0, scale) * detmath::pow(u, 1.0 / shape);
  }
  const double d = shape - 1.0 / 3.0;
  const double c = 1.0 / std::sqrt(9.0 * d);
  for (;;) {
    double x, v;
    do {
      x = normal();
      v = 1.0 + c * x;
    } while (v <= 0.0);
    v = v * v * v;
    const double u = uniform();
    if (u < 1.0 - 0.0331 * x * x * x * x) return d * v * scale;
    if (u > 0.0 && detmath::log(u) < 0.5 * x * x + d * (1.0 - v + detmath::log(v)))
      return d * v * scale;
  }
}

double Rng::gammaMeanCv(double mean, double cv) {
  if (cv <= 0.0) return mean;
  const double shape = 1.0 / (cv * cv);
  return gamma(shape, mean / shape);
}

int Rng::poisson(double mean) {
  if (mean <= 0.0) return 0;
  if (mean >= 30.0) {
    const double x = std::floor(normal(mean, std::sqrt(mean)) + 0.5);
    return x < 0.0 ? 0 : static_cast<int>(x);
  }
  // Inversion by sequential search.
  const double u = uniform();
  double p = detmath::exp(-mean);
  double cdf = p;
  int k = 0;
  while (u >= cdf && k < 1000) {
    ++k;
    p *= mean / static_cast<double>(k);
    cdf += p;
  }
  return k;
}

double normalQuantile(double p) {
  // Acklam (2003), coefficients as published with the algorithm.
  static const double a[] = {-3.969683028665376e+01, 2.209460984245205e+02,  -2.759285104469687e+02,
                             1.383577518672690e+02,  -3.066479806614716e+01, 2.506628277459239e+00};
  static const double b[] = {-5.447609879822406e+01, 1.615858368580409e+02, -1.556989798598866e+02,
                             6.680131188771972e+01, -1.328068155288572e+01};
  static const double c[] = {-7.784894002430293e-03, -3.223964580411365e-01, -2.400758277161838e+00,
                             -2.549732539343734e+00, 4.374664141464968e+00,  2.938163982698783e+00};
  static const double d[] = {7.784695709041462e-03, 3.224671290700398e-01, 2.445134137142996e+00,
                             3.754408661907416e+00};
  const double plow = 0.02425;
  double x;
  if (p < plow) {
    const double q = std::sqrt(-2.0 * detmath::log(p));
    x = (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
        ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1.0);
  } else if (p <= 1.0 - plow) {
    const double q = p - 0.5;
    const double r = q * q;
    x = (((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q /
        (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1.0);
  } else {
    const double q = std::sqrt(-2.0 * detmath::log(1.0 - p));
    x = -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) /
        ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1.0);
  }
  return x;  // relative error below 1.2e-9 (Acklam), plenty for a float table
}

NormalTable::NormalTable() {
  for (int i = 0; i < 65536; ++i)
    table_[static_cast<std::size_t>(i)] =
        static_cast<float>(normalQuantile((static_cast<double>(i) + 0.5) / 65536.0));
}

const NormalTable& normalTable() {
  static const NormalTable table;
  return table;
}

}  // namespace budledger::demo
