// The simulator's own random streams and elementary functions.
#include <gtest/gtest.h>

#include <cmath>

#include "demo/detmath.h"
#include "demo/rng.h"

namespace budledger::demo {
namespace {

TEST(DetMath, AgreesWithTheCLibraryToRoundingLevel) {
  for (double x : {-30.0, -2.5, -0.1, 0.0, 1e-8, 0.3, 1.0, 7.7, 50.0})
    EXPECT_NEAR(detmath::exp(x), std::exp(x), 1e-14 * std::exp(x)) << x;
  for (double x : {1e-12, 0.01, 0.5, 0.999, 1.0, 2.0, 1234.5, 1e30})
    EXPECT_NEAR(detmath::log(x), std::log(x), 1e-14 * (1.0 + std::fabs(std::log(x)))) << x;
  for (double x : {-10.0, -3.0, -0.5, 0.0, 0.7, 1.5707963, 3.0, 6.0, 100.0}) {
    EXPECT_NEAR(detmath::sin(x), std::sin(x), 1e-13) << x;
    EXPECT_NEAR(detmath::cos(x), std::cos(x), 1e-13) << x;
  }
  for (double y : {-2.0, -0.3, 0.0, 0.4, 5.0})
    for (double x : {-3.0, -0.2, 0.1, 2.0})
      EXPECT_NEAR(detmath::atan2(y, x), std::atan2(y, x), 1e-13);
  EXPECT_NEAR(detmath::cbrt(27.0), 3.0, 1e-13);
}

TEST(Rng, XoshiroStreamIsFixed) {
  // splitmix64 from seed 0 gives 0xe220a8397b1dcdaf (Vigna's reference
  // implementation, splitmix64.c); the stream must never change, or every
  // stored scenario would render differently.
  std::uint64_t s = 0;
  EXPECT_EQ(splitmix64(s), 0xe220a8397b1dcdafULL);
  Rng a(42), b(42), c(43);
  for (int i = 0; i < 100; ++i) {
    const auto x = a.next();
    EXPECT_EQ(x, b.next());
    EXPECT_NE(x, c.next());
  }
  EXPECT_NE(Rng(42).derive("a").next(), Rng(42).derive("b").next());
  EXPECT_EQ(Rng(42).derive("a", 3).next(), Rng(42).derive("a", 3).next());
}

TEST(Rng, DistributionsHaveTheirMoments) {
  Rng r(2024);
  const int n = 200000;
  double sn = 0, sn2 = 0, se = 0, sg = 0, sg2 = 0, sp = 0, sp2 = 0, su = 0;
  for (int i = 0; i < n; ++i) {
    const double z = r.normal();
    sn += z;
    sn2 += z * z;
    se += r.exponential(3.0);
    const double g = r.gammaMeanCv(90.0, 0.15);
    sg += g;
    sg2 += g * g;
    const int p = r.poisson(4.5);
    sp += p;
    sp2 += static_cast<double>(p) * p;
    su += r.uniform();
  }
  // Tolerances: about five standard errors of each mean.
  EXPECT_NEAR(sn / n, 0.0, 0.012);
  EXPECT_NEAR(sn2 / n, 1.0, 0.02);
  EXPECT_NEAR(se / n, 3.0, 0.035);
  EXPECT_NEAR(sg / n, 90.0, 0.16);
  EXPECT_NEAR(std::sqrt(sg2 / n - (sg / n) * (sg / n)) / (sg / n), 0.15, 0.003);
  EXPECT_NEAR(sp / n, 4.5, 0.025);
  EXPECT_NEAR(sp2 / n - (sp / n) * (sp / n), 4.5, 0.08);  // Poisson: variance = mean
  EXPECT_NEAR(su / n, 0.5, 0.004);
}

TEST(Rng, NormalTableIsAStandardNormal) {
  const auto& t = normalTable();
  double s = 0, s2 = 0;
  for (int i = 0; i < 65536; ++i) {
    s += t[static_cast<std::uint16_t>(i)];
    s2 += static_cast<double>(t[static_cast<std::uint16_t>(i)]) * t[static_cast<std::uint16_t>(i)];
  }
  EXPECT_NEAR(s / 65536, 0.0, 1e-6);
  EXPECT_NEAR(s2 / 65536, 1.0, 2e-3);  // the cut tails lose a little variance
  // Φ⁻¹(0.975) = 1.959964 (standard normal tables).
  EXPECT_NEAR(normalQuantile(0.975), 1.959964, 1e-6);
}

}  // namespace
}  // namespace budledger::demo
