// The emission model's reading of the mother's morphology: what counts as a sign of
// death and what does not.
#include <gtest/gtest.h>

#include "core/propose/emission.h"

namespace budledger::propose {
namespace {

struct OneFrame {
  CycleModel model{CycleParams{}};
  EmissionParams params = EmissionParams::defaults(model.buddedFrames(), model.deadFrames());
  MorphBaseline baseline{{0.0, 0.0, 0.0}};

  OneFrame() {
    // Live mothers vary little; at death the first reading falls and the third rises
    // (as learned on simulated stacks: contrast down, log area up), and scatters more.
    params.morphLiveSigma = {0.7, 0.3, 0.065};
    params.morphDeadSigma = {2.0, 0.6, 0.2};
    for (std::size_t k = 0; k < params.morphDeadMean.size(); ++k) {
      const double age = static_cast<double>(k + 1) / static_cast<double>(model.deadFrames());
      params.morphDeadMean[k] = {-4.0 * age, 0.0, 0.15 * age};
    }
  }
  // Log-likelihood of a mother seen alone with these readings: (live, oldest dead).
  std::pair<double, double> score(std::array<double, kMorphCount> morph) const {
    FrameEvidence f;
    f.occupancy = {0.01, 0.97, 0.01, 0.01};
    f.budRatio = 0.0;
    f.morph = morph;
    const auto ll = emissionLogLikelihood(model, params, {f}, &baseline);
    return {ll[static_cast<std::size_t>(model.unbuddedState())],
            ll[static_cast<std::size_t>(model.deadState(model.deadFrames()))]};
  }
};

TEST(Emission, DeviationTheWayDeathGoesFavoursDeath) {
  const OneFrame f;
  const auto [live, dead] = f.score({-3.0, 0.0, 0.12});
  EXPECT_GT(dead, live + 5);
}

// A newcomer smaller than the mothers around her (log area 0.45 below them, as on
// simulated stacks, seed 8001) deviates the other way from the swelling at death. The
// broad dead spread used to explain her better than a live state: newcomers were
// called dead on arrival and their records split into short dead ones.
TEST(Emission, DeviationTheOtherWayIsNoSignOfDeath) {
  const OneFrame f;
  const auto [live, dead] = f.score({0.0, 0.0, -0.45});
  EXPECT_LE(dead, live + 1e-9);
  // Also when another reading is normal for either: contrast as usual, area small.
  const auto [live2, dead2] = f.score({-0.5, 0.1, -0.3});
  EXPECT_LE(dead2, live2 + 1e-9);
}

}  // namespace
}  // namespace budledger::propose
