#include "demo/detmath.h"

#include <cmath>
#include <limits>

namespace budledger::demo::detmath {
namespace {

constexpr double kLn2Hi = 6.93147180369123816490e-01;  // ln 2 split so k*kLn2Hi is exact
constexpr double kLn2Lo = 1.90821492927058770002e-10;
constexpr double kLn2 = 0.693147180559945309417;

// sin and cos of |r| <= pi/4 by Taylor series, enough terms for double.
double sinSmall(double r) {
  const double r2 = r * r;
  double term = r, sum = r;
  for (int n = 1; n <= 11; ++n) {
    term *= -r2 / static_cast<double>((2 * n) * (2 * n + 1));
    sum += term;
  }
  return sum;
}

double cosSmall(double r) {
  const double r2 = r * r;
  double term = 1.0, sum = 1.0;
  for (int n = 1; n <= 11; ++n) {
    term *= -r2 / static_cast<double>((2 * n - 1) * (2 * n));
    sum += term;
  }
  return sum;
}

// atan for |x| <= tan(pi/12) by its alternating series.
double atanSmall(double x) {
  const double x2 = x * x;
  double term = x, sum = x;
  for (int n = 1; n <= 20; ++n) {
    term *= -x2;
    sum += term / static_cast<double>(2 * n + 1);
  }
  return sum;
}

double atanPositive(double x) {
  // Reduce x >= 0 to [0, tan(pi/12)] with atan(x) = pi/2 - atan(1/x) and
  // atan(x) = pi/6 + atan((x*sqrt3 - 1)/(x + sqrt3)).
  bool inverted = false;
  if (x > 1.0) {
    x = 1.0 / x;
    inverted = true;
  }
  constexpr double kSqrt3 = 1.73205080756887729353;
  constexpr double kTan15 = 0.26794919243112270647;
  double offset = 0.0;
  if (x > kTan15) {
    x = (x * kSqrt3 - 1.0) / (x + kSqrt3);
    offset = kPi / 6.0;
  }
  const double a = offset + atanSmall(x);
  return inverted ? kPi / 2.0 - a : a;
}

}  // namespace

double exp(double x) {
  if (x > 709.0) return std::numeric_limits<double>::infinity();
  if (x < -745.0) return 0.0;
  const double k = std::floor(x / kLn2 + 0.5);
  const double r = (x - k * kLn2Hi) - k * kLn2Lo;  // |r| <= ln2/2
  double term = 1.0, sum = 1.0;
  for (int n = 1; n <= 20; ++n) {
    term *= r / static_cast<double>(n);
    sum += term;
  }
  return std::ldexp(sum, static_cast<int>(k));
}

double log(double x) {
  if (!(x > 0.0))
    return x == 0.0 ? -std::numeric_limits<double>::infinity()
                    : std::numeric_limits<double>::quiet_NaN();
  if (std::isinf(x)) return x;
  int e = 0;
  double m = std::frexp(x, &e);  // m in [0.5, 1)
  if (m < 0.70710678118654752440) {
    m *= 2.0;
    --e;
  }
  const double s = (m - 1.0) / (m + 1.0);  // |s| < 0.1716
  const double s2 = s * s;
  double power = s, sum = s;
  for (int n = 1; n <= 14; ++n) {
    power *= s2;
    sum += power / static_cast<double>(2 * n + 1);
  }
  return 2.0 * sum + static_cast<double>(e) * kLn2Lo + static_cast<double>(e) * kLn2Hi;
}

double sin(double x) {
  const double k = std::floor(x / (kPi / 2.0) + 0.5);
  const double r = x - k * (kPi / 2.0);
  switch (static_cast<long long>(k) & 3) {
    case 0:
      return sinSmall(r);
    case 1:
      return cosSmall(r);
    case 2:
      return -sinSmall(r);
    default:
      return -cosSmall(r);
  }
}

double cos(double x) { return sin(x + kPi / 2.0); }

double pow(double base, double exponent) { return exp(exponent * log(base)); }

double cbrt(double x) { return x <= 0.0 ? 0.0 : exp(log(x) / 3.0); }

double atan2(double y, double x) {
  if (x == 0.0 && y == 0.0) return 0.0;
  const double ax = std::fabs(x), ay = std::fabs(y);
  double a = ax >= ay ? atanPositive(ay / ax) : kPi / 2.0 - atanPositive(ax / ay);
  if (x < 0.0) a = kPi - a;
  return y < 0.0 ? -a : a;
}

}  // namespace budledger::demo::detmath
