// Normal and chi-square functions. Expected values: R 4.2.2 qnorm / pchisq,
// run live (printed with 17 significant digits).
#include <gtest/gtest.h>

#include "core/stats/distributions.h"

namespace budledger::stats {
namespace {

TEST(Distributions, NormalQuantile) {
  EXPECT_NEAR(twoSidedZ(0.95), 1.959963984540054, 1e-15);
  EXPECT_NEAR(normalQuantile(0.5), 0.0, 1e-16);
  EXPECT_NEAR(normalQuantile(0.025), -1.959963984540054, 1e-15);
  EXPECT_NEAR(normalQuantile(1e-10), -6.3613409024040557, 1e-13);
  EXPECT_NEAR(normalQuantile(0.995), 2.5758293035488999, 1e-14);
}

TEST(Distributions, ChiSquareTails) {
  EXPECT_NEAR(chiSquareUpperTail(16.79294099, 1) / 4.1688091076133544e-05, 1.0, 1e-12);
  EXPECT_NEAR(chiSquareUpperTail(3.84, 1), 0.050043521248705224, 1e-15);
  EXPECT_NEAR(chiSquareUpperTail(5.0, 2), 0.0820849986238988, 1e-15);
  EXPECT_NEAR(chiSquareUpperTail(7.5, 3) / 0.057558451972636406, 1.0, 1e-12);
  EXPECT_NEAR(chiSquareUpperTail(0.3, 3) / 0.96002848030687771, 1.0, 1e-12);
  EXPECT_NEAR(chiSquareUpperTail(200.0, 3) / 4.2185411071920418e-43, 1.0, 1e-10);
  EXPECT_EQ(chiSquareUpperTail(0.0, 2), 1.0);
}

}  // namespace
}  // namespace budledger::stats
