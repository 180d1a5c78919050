// The cycle model's budded phase: how long it lasts beyond its minimum.
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "core/propose/cycle_model.h"

namespace budledger::propose {
namespace {

struct Duration {
  double mean = 0, sd = 0;  // of the frames from the first bud age to the separation
};

// The distribution of the budded time, read off the model's arcs by pushing the
// probability of a mother starting at bud age 1 through them until she separates.
Duration buddedDuration(const CycleModel& model) {
  std::vector<double> mass(static_cast<std::size_t>(model.stateCount()), 0.0);
  mass[static_cast<std::size_t>(model.buddedState(1))] = 1;
  double total = 0, sum = 0, squares = 0;
  for (int step = 1; step < 2000; ++step) {
    std::vector<double> next(mass.size(), 0.0);
    for (const Arc& a : model.hmm().arcs()) {
      if (model.budAge(a.from) == 0 || a.from == model.separatedBudState()) continue;
      const double m = mass[static_cast<std::size_t>(a.from)] * std::exp(a.logp);
      const auto tag = static_cast<Transition>(a.tag);
      if (tag == Transition::Separation || tag == Transition::SeparationBud) {
        total += m;
        sum += m * step;
        squares += m * step * step;
      } else if (model.budAge(a.to) > 0 && a.to != model.separatedBudState()) {
        next[static_cast<std::size_t>(a.to)] += m;
      }
    }
    mass = next;
  }
  Duration d;
  d.mean = sum / total;
  d.sd = std::sqrt(std::max(0.0, squares / total - d.mean * d.mean));
  return d;
}

CycleParams tenMinuteFrames(int tailStages) {
  CycleParams p;
  p.intervalMin = 10;
  p.meanBuddedExtraMin = 30;
  p.buddedTailStages = tailStages;
  return p;
}

// Budded 45 min at least plus 30 min on average: 4 frames + 3 (death and washout
// leak a little, so the mean is checked to a tenth of a frame).
TEST(CycleModel, BuddedTimeHasTheMeanAsked) {
  for (int stages : {1, 2}) {
    const CycleModel model(tenMinuteFrames(stages));
    EXPECT_EQ(model.buddedFrames(), 4);
    EXPECT_NEAR(buddedDuration(model).mean, 7.0, 0.1) << stages << " stages";
  }
}

// A sum of two geometric stays of 1.5 frames each spreads less than one of 3 frames:
// SD sqrt(2 * 1.5 * 2.5) = 2.74 against sqrt(3 * 4) = 3.46 frames (a geometric count of
// failures with mean mu has variance mu (1 + mu), a standard result).
TEST(CycleModel, TwoTailStagesMakeTheBuddedTimeRegular) {
  const Duration one = buddedDuration(CycleModel(tenMinuteFrames(1)));
  const Duration two = buddedDuration(CycleModel(tenMinuteFrames(2)));
  EXPECT_NEAR(one.sd, std::sqrt(3.0 * 4.0), 0.05);
  EXPECT_NEAR(two.sd, std::sqrt(2.0 * 1.5 * 2.5), 0.05);
  EXPECT_EQ(CycleModel(CycleParams{}).buddedTailStages(), 2);
}

// At 15-min frames the chain has three ages; the first two stay single frames.
TEST(CycleModel, FirstTwoBudAgesNeverRepeat) {
  CycleParams p;
  p.intervalMin = 15;
  const CycleModel model(p);
  EXPECT_EQ(model.buddedFrames(), 3);
  EXPECT_EQ(model.buddedTailStages(), 1);
  for (const Arc& a : model.hmm().arcs()) {
    if (a.from == a.to && model.budAge(a.from) > 0 && a.from != model.separatedBudState()) {
      EXPECT_EQ(model.budAge(a.from), 3);
    }
  }
}

}  // namespace
}  // namespace budledger::propose
