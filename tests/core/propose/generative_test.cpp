#include <gtest/gtest.h>

#include "core/evaluate/score.h"
#include "core/lineage/lineage.h"
#include "core/propose/proposer.h"
#include "generative.h"

namespace budledger::propose {
namespace {

using testing::Rng;

struct Experiment {
  std::vector<int> ids;
  std::vector<TrapEvidence> evidence;
  evaluate::Truth truth;
  int frames = 0;
};

// A position of `traps` traps sampled from a model with parameters `truthCycle`,
// which the decoder does not know (it starts from the defaults and re-estimates).
Experiment sampleExperiment(const CycleParams& truthCycle, int traps, int frames,
                            std::uint64_t seed) {
  Experiment x;
  x.frames = frames;
  const CycleModel model(truthCycle);
  const EmissionParams ep = EmissionParams::defaults(model.buddedFrames(), model.deadFrames());
  Rng rng(seed);
  evaluate::TruthPosition p;
  p.name = "G";
  p.frames = frames;
  p.intervalMin = truthCycle.intervalMin;
  for (int i = 0; i < traps; ++i) {
    auto s = testing::sampleTrap(model, ep, frames, rng);
    x.ids.push_back(i);
    x.evidence.push_back(s.evidence);
    p.traps.push_back({i, i / 7, i % 7, 100.0 * (i % 7), 100.0 * (i / 7)});
    std::vector<Event> trueEvents = s.events;
    for (auto& e : trueEvents) e.trap = i;
    for (const auto& t : lineage::tenuresFromEvents(trueEvents, frames).tenures)
      p.tenures.push_back(
          {i, t.mother, t.firstFrame, t.lastFrame, t.divisions, t.outcome == Outcome::Death});
    for (const auto& e : trueEvents) p.events.push_back({i, 0, e.frame, e.kind});
  }
  x.truth.positions.push_back(p);
  return x;
}

evaluate::Score scoreCalls(const Experiment& x, const PositionCalls& calls) {
  evaluate::EnginePosition e;
  e.name = "G";
  e.frames = x.frames;
  for (const auto& t : calls.traps) {
    e.traps.push_back({t.trap, 100.0 * (t.trap % 7), 100.0 * (t.trap / 7)});
    e.events.insert(e.events.end(), t.events.begin(), t.events.end());
  }
  return evaluate::score(x.truth, {e});
}

// The oracle decodes with the parameters that generated the data: the best this model can
// do on this evidence. Decoding from the defaults with re-estimation must come close.
evaluate::Score oracleScore(const Experiment& x, const CycleParams& truthCycle) {
  const CycleModel model(truthCycle);
  const EmissionParams ep = EmissionParams::defaults(model.buddedFrames(), model.deadFrames());
  PositionCalls calls;
  for (std::size_t i = 0; i < x.ids.size(); ++i)
    calls.traps.push_back(decodeTrap(0, x.ids[i], model, ep, x.evidence[i], ReviewRules{}));
  return scoreCalls(x, calls);
}

void expectNearOracle(const evaluate::Score& s, const evaluate::Score& oracle) {
  EXPECT_GE(s.kind(EventKind::Separation).f1(), oracle.kind(EventKind::Separation).f1() - 0.02);
  EXPECT_GE(s.kind(EventKind::Bud).f1(), oracle.kind(EventKind::Bud).f1() - 0.02);
  EXPECT_GE(s.exactRate(), oracle.exactRate() - 0.08);
  EXPECT_LE(s.mae, oracle.mae + 0.15);
  // Absolute floors: the evidence is noisy (7% of frames misread), not hopeless.
  EXPECT_GE(s.kind(EventKind::Separation).f1(), 0.85);
  EXPECT_GE(s.kind(EventKind::Death).f1(), 0.7);
  EXPECT_EQ(s.split, 0);
  EXPECT_EQ(s.spurious, 0);
}

// Fresh seeds; durations differ from the decoder's defaults so EM has work to do.
TEST(Generative, DecodesItsOwnStoryAtTenMinuteFrames) {
  CycleParams truth;
  truth.meanUnbuddedMin = 25;
  truth.meanBuddedExtraMin = 20;
  truth.deathPerMin = 1.0 / 1500;
  const Experiment x = sampleExperiment(truth, 42, 200, 20261);
  // Evidence drawn from the model itself has truly independent channels, so its exact
  // posteriors apply; the tempering of confidences is for images, whose channels share
  // one outline's errors.
  ProposeOptions exact;
  exact.confidenceTemper = 1.0;
  const evaluate::Score s = scoreCalls(x, proposePosition(0, x.ids, x.evidence, exact));
  expectNearOracle(s, oracleScore(x, truth));
  // Calibration: confident calls are right about as often as they claim.
  for (const auto& bin : s.reliability)
    if (bin.count >= 30) {
      EXPECT_NEAR(static_cast<double>(bin.correct) / bin.count, bin.meanConfidence, 0.1) << bin.lo;
    }
}

TEST(Generative, ScalesWithTheFrameInterval) {
  CycleParams truth;
  truth.intervalMin = 5;
  const Experiment x = sampleExperiment(truth, 20, 300, 77031);
  ProposeOptions opt;
  opt.cycle.intervalMin = 5;
  const evaluate::Score s = scoreCalls(x, proposePosition(0, x.ids, x.evidence, opt));
  expectNearOracle(s, oracleScore(x, truth));
}

// Tempering the confidences changes how sure the calls are, and nothing the decoded
// path calls: arrivals, washouts and its separations stay as they are. Read from the
// tempered posterior are: buds moved to their posterior's mode within two frames,
// deaths the posterior does not back, dropped, and separations added in stretches far
// longer than the mother's cycles around them (proposer.cpp), each with its new bud.
TEST(Generative, TemperedConfidencesKeepTheCalls) {
  const Experiment x = sampleExperiment(CycleParams{}, 12, 160, 9031);
  ProposeOptions exact, tempered;
  exact.confidenceTemper = 1.0;
  tempered.confidenceTemper = 0.35;
  const PositionCalls a = proposePosition(0, x.ids, x.evidence, exact);
  const PositionCalls b = proposePosition(0, x.ids, x.evidence, tempered);
  ASSERT_EQ(a.traps.size(), b.traps.size());
  auto only = [](const std::vector<Event>& events, bool buds) {
    std::vector<Event> out;
    for (const auto& e : events)
      if ((e.kind == EventKind::Bud) == buds && e.kind != EventKind::Death) out.push_back(e);
    return out;
  };
  double sureA = 0, sureB = 0;
  int added = 0;
  for (std::size_t i = 0; i < a.traps.size(); ++i) {
    const auto ea = only(a.traps[i].events, false), eb = only(b.traps[i].events, false);
    std::size_t k = 0;
    for (const auto& e : eb) {
      if (k < ea.size() && ea[k].frame == e.frame && ea[k].kind == e.kind) {
        sureA += ea[k].confidence;
        sureB += e.confidence;
        ++k;
      } else {
        EXPECT_EQ(e.kind, EventKind::Separation) << "trap " << i << " frame " << e.frame;
        ++added;
      }
    }
    EXPECT_EQ(k, ea.size()) << "trap " << i << ": an exact call is missing when tempered";
    const auto ba = only(a.traps[i].events, true), bb = only(b.traps[i].events, true);
    if (ba.size() != bb.size()) continue;  // a separation added with its bud
    for (std::size_t j = 0; j < ba.size(); ++j) EXPECT_LE(std::abs(ba[j].frame - bb[j].frame), 2);
  }
  EXPECT_LE(added, 2);
  EXPECT_LT(sureB, sureA);  // less sure on the whole
}

TEST(Generative, ReestimationMovesDurationsTowardsTheTruth) {
  CycleParams truth;
  truth.meanUnbuddedMin = 40;
  const Experiment x = sampleExperiment(truth, 42, 240, 5150);
  const PositionCalls calls = proposePosition(0, x.ids, x.evidence, ProposeOptions{});
  const double start = ProposeOptions{}.cycle.meanUnbuddedMin;
  EXPECT_GT(calls.cycle.meanUnbuddedMin, start + 0.5 * (40 - start));
}

}  // namespace
}  // namespace budledger::propose
