#pragma once
// Scoring the engine against simulator truth (issue "Engine", targets):
// per-kind precision/recall/F1 with one-to-one matching at +-tolerance
// frames, per-mother RLS exact rate, mean absolute and signed error, records
// per true tenure (splits, missing and spurious mothers), Kaplan-Meier median
// of truth and engine, review effort (edits per 100 true divisions) and a
// reliability table of confidences.
//
// Traps are paired by nearest centre within half the trap pitch after
// removing the median offset between the two sets of centres (the engine may
// place its centre elsewhere on the trap than the truth's cup centre).
#include <array>
#include <string>
#include <vector>

#include "core/base/events.h"
#include "core/evaluate/truth.h"

namespace budledger::evaluate {

struct EngineTrap {
  int trap = 0;
  double x = 0;  // frame-0 pixels
  double y = 0;
};

struct EnginePosition {
  std::string name;
  int frames = 0;
  std::vector<EngineTrap> traps;
  std::vector<Event> events;  // the calls to score (proposals or the journal's current events)
};

struct ScoreOptions {
  int tolerance = 1;  // frames
  // Truth positions the engine never saw: skipped with a note (true), or counted as
  // entirely missed (false).
  bool skipMissingPositions = true;
  std::vector<double> reliabilityEdges{0.0, 0.5, 0.7, 0.8, 0.9, 0.95, 0.99, 1.0};
};

struct KindScore {
  int truth = 0;
  int engine = 0;
  int matched = 0;
  int moves = 0;    // unmatched pairs of the same trap: one drag fixes each
  int deletes = 0;  // false events left over
  int adds = 0;     // missed events left over
  double precision() const { return engine ? static_cast<double>(matched) / engine : 1.0; }
  double recall() const { return truth ? static_cast<double>(matched) / truth : 1.0; }
  double f1() const {
    return truth + engine ? 2.0 * matched / static_cast<double>(truth + engine) : 1.0;
  }
  int edits() const { return moves + deletes + adds; }
};

struct ReliabilityBin {
  double lo = 0, hi = 0;
  int count = 0;
  int correct = 0;
  double meanConfidence = 0;
};

struct Score {
  std::array<KindScore, 5> kinds{};  // indexed by EventKind
  int trapsTruth = 0, trapsEngine = 0, trapsMatched = 0;
  // Mothers (true tenures).
  int mothers = 0;
  int exact = 0;
  double mae = 0;
  double bias = 0;  // engine minus truth, mean over mothers
  int oneRecord = 0, split = 0, missing = 0, spurious = 0;
  double kmMedianTruth = 0, kmMedianEngine = 0;  // NaN when the curve stays above one half
  int trueDivisions = 0;
  int edits = 0;
  double editsPer100 = 0;
  std::vector<ReliabilityBin> reliability;
  double calibrationError = 0;  // expected calibration error over the bins
  std::vector<std::string> notes;

  const KindScore& kind(EventKind k) const { return kinds[static_cast<std::size_t>(k)]; }
  double exactRate() const { return mothers ? static_cast<double>(exact) / mothers : 1.0; }
};

Score score(const Truth& truth, const std::vector<EnginePosition>& engine,
            const ScoreOptions& options = {});

// Pairs truth traps with engine traps (index into `engine` per truth trap, -1 when none):
// nearest centre within half the pitch, after removing the median offset.
std::vector<int> pairTraps(const std::vector<TruthTrap>& truth,
                           const std::vector<EngineTrap>& engine);

// Kaplan-Meier median of divisions: smallest d with S(d) <= 0.5, NaN if never.
double kaplanMeierMedian(const std::vector<std::pair<int, bool>>& divisionsAndDied);

std::string toMarkdown(const Score& s);
std::string toJson(const Score& s);

}  // namespace budledger::evaluate
