#pragma once
// proposePosition: the temporal model applied to every trap of one position.
// Parameters that differ between experiments (how long G1 and the budded
// phase last, how the classifier's output maps to states, bud growth) are
// re-estimated from the position's own evidence by a few Baum-Welch rounds
// pooled over its traps, starting from common-practice defaults; then each
// trap is decoded with Viterbi and each event gets its posterior probability
// (forward-backward) of happening within one frame of the call. A death the
// posterior does not back is taken out and the trap decoded again without it, and so
// is a "newcomer" who never buds and dies right after a corpse left: the corpse, missed
// for a frame or two.
//
// Invariants: events are per trap in frame order; a trap flagged
// crowded-throughout gets no events (nothing can be told apart in it); every
// confidence is in [0, 1].
#include <string>
#include <vector>

#include "core/base/events.h"
#include "core/base/progress.h"
#include "core/propose/cycle_model.h"
#include "core/propose/emission.h"
#include "core/propose/evidence.h"

namespace budledger::propose {

struct ReviewRules {
  double crowdedShare = 0.8;      // of informative frames called crowded: no events
  double emptyShare = 0.98;       // of informative frames called empty: never occupied
  double informativeShare = 0.5;  // fewer informative frames than this: flagged
};

struct ProposeOptions {
  CycleParams cycle;
  int emIterations = 6;
  int localBaselineRounds = 2;        // last rounds compare a mother with her own live frames
  double localWindowMin = 300;        // reach of that local baseline
  double emissionPriorWeight = 200;   // pseudo-counts per confusion row
  double transitionPriorWeight = 20;  // pseudo-counts per duration estimate
  // The emission channels multiply as if independent, but several read one outline and
  // share its errors, so their product overstates the evidence: posteriors (the events'
  // confidences) were near 0.99 for calls right 70-85% of the time. They are computed
  // from log-likelihoods scaled by this factor (a tempered likelihood); the Viterbi
  // path uses the full one (only where buds sit within it and whether an unbacked death
  // stands are read from the tempered posterior, proposer.cpp). Fitted once on the occupancy
  // model's training stacks (preset seeds 101-104; mean expected calibration error over
  // the four 0.090 at 1, 0.051 at 0.5, 0.029 at 0.35, 0.038 at 0.25) and then held fixed.
  double confidenceTemper = 0.35;
  ReviewRules review;
  int threads = 0;  // 0: all hardware threads
};

// Review flags a trap can carry (the measurements' features JSON key "review").
inline constexpr const char* kFlagCrowded = "crowded-throughout";
inline constexpr const char* kFlagEmpty = "never-occupied";
inline constexpr const char* kFlagUninformative = "mostly-uninformative";

struct TrapCalls {
  int trap = 0;
  std::vector<Event> events;
  std::vector<std::string> flags;
  std::vector<int> path;                     // Viterbi state per frame
  std::vector<float> pLive, pBudded, pDead;  // posterior per frame
};

struct PositionCalls {
  std::vector<TrapCalls> traps;
  CycleParams cycle;        // after re-estimation
  EmissionParams emission;  // after re-estimation
  int buddedFrames = 0;
  double logLikelihood = 0;
};

// `evidence[i]` belongs to trap `trapIds[i]`; all traps have the same frame count.
PositionCalls proposePosition(int position, const std::vector<int>& trapIds,
                              const std::vector<TrapEvidence>& evidence,
                              const ProposeOptions& options, const Progress& progress = {});

// Decodes one trap under a fixed model (no re-estimation). `confidenceTemper` scales
// the log-likelihoods for the posteriors only (ProposeOptions::confidenceTemper); 1 gives
// the model's exact posteriors.
TrapCalls decodeTrap(int position, int trap, const CycleModel& model,
                     const EmissionParams& emission, const TrapEvidence& evidence,
                     const ReviewRules& review, const MorphBaseline* baseline = nullptr,
                     double confidenceTemper = 1.0);

}  // namespace budledger::propose
