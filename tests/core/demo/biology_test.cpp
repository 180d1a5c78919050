// The simulated lives respect the one-layer geometry of a trap: a bud never emerges
// where a daughter still sits beside her mother.
#include <gtest/gtest.h>

#include <cmath>

#include "demo/biology.h"
#include "demo/detmath.h"

namespace budledger::demo {
namespace {

// Every daughter lodges (for hours) and every bud would grow into the outlet gap:
// each bud after the first then meets the daughter before it in that gap.
BiologyParams crowdedOutlet() {
  BiologyParams b;
  b.lodgeProbability = 1.0;
  b.lodgeMin = 300.0;
  b.upstreamBudFraction = 0.0;
  b.washoutPerHour = 0.0;
  return b;
}

TEST(Biology, ABudNeverGrowsWhereADaughterSits) {
  const BiologyParams b = crowdedOutlet();
  int buds = 0, turned = 0, pushed = 0;
  for (std::uint64_t trap = 0; trap < 40; ++trap) {
    const TrapLife life = simulateTrap(b, 300, 10.0, 3.0, Rng(77).derive("trap", trap));
    for (const auto& m : life.occupants)
      for (std::size_t k = 0; k < m.divisions.size(); ++k) {
        const Division& d = m.divisions[k];
        const double r = m.radiusUm * detmath::cbrt(1.0 + b.volumeGrowth * d.age);
        for (std::size_t j = 0; j < k; ++j)
          EXPECT_FALSE(budSiteTaken(d.angle, d.daughterRadiusUm, m.divisions[j], r, d.tBud))
              << "bud " << k << " of a mother grows over daughter " << j;
        ++buds;
        turned += d.upstream;
        for (std::size_t j = 0; j < k; ++j) pushed += m.divisions[j].tGone == d.tBud;
      }
  }
  ASSERT_GT(buds, 200);
  // No bud was drawn upstream: those there were turned away from a held outlet, and
  // where both sides were held a daughter was pushed off instead.
  EXPECT_GT(turned, buds / 4);
  EXPECT_GT(turned + pushed, buds / 2);
}

// The renderer and the rule above read one placement: lodged daughters stay where they
// lodged; others are carried downstream, away from the mother.
TEST(Biology, DaughtersAreCarriedAwayUnlessLodged) {
  Division d;
  d.tSep = 100;
  d.angle = 0.1;
  d.daughterRadiusUm = 1.7;
  const auto start = daughterPlace(d, 2.2, 100), later = daughterPlace(d, 2.2, 110);
  EXPECT_NEAR(start.distUm, 2.2 + 1.7 + 0.3, 1e-12);  // apart from her at once
  EXPECT_GT(later.distUm, start.distUm + 1.0);
  d.lodged = true;
  d.lodgeAngle = -0.05;
  EXPECT_EQ(daughterPlace(d, 2.2, 100).distUm, daughterPlace(d, 2.2, 300).distUm);
  EXPECT_EQ(daughterPlace(d, 2.2, 300).angle, -0.05);
}

}  // namespace
}  // namespace budledger::demo
