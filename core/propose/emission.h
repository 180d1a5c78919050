#pragma once
// EmissionModel: how likely a frame's evidence is under each hidden state.
// Three independent channels multiply (naive Bayes):
//  - occupancy: the classifier's posteriors become scaled likelihoods
//    q(c)/prior(c) (Bourlard & Morgan's hybrid HMM), mixed by P(class | state
//    group), a confusion table learned from the data by EM;
//  - bud size: bud/mother area ratio (0 without a bud; only when a mother was
//    measured), Gaussian around a mean that grows with the bud's age, near
//    zero for an unbudded mother, broad for a dead one;
//  - departure: area other cells left near the mother since the last frame,
//    large just after a separation (the daughter carried away);
//  - dead look: the morphology score, mixed by P(dead look | state group);
//  - morphology: the mother's features minus the position's live baseline
//    (what live mothers of this position look like), Gaussian with mean zero
//    while alive and a mean that follows the time since death. A position-wide
//    reference cannot be talked into taking a corpse for a live cell, as a
//    trap's own baseline could.
// Each channel is a robust mixture with a small outlier weight, so one bad
// frame can shift a call by a bounded amount but never force an event.
// An uninformative frame contributes log-likelihood 0 to every state.
#include <array>
#include <vector>

#include "core/propose/cycle_model.h"
#include "core/propose/evidence.h"

namespace budledger::propose {

struct EmissionParams {
  // P(occupancy class | state group); rows in StateGroup order, sum to 1.
  std::array<std::array<double, 4>, kStateGroupCount> occupancy{};
  // Class priors the classifier's posteriors were trained under.
  std::array<double, 4> classPrior{0.25, 0.25, 0.25, 0.25};
  // Mean bud/mother area ratio by bud age 1..m (index 0 is age 1).
  std::vector<double> budRatioMean;
  double budRatioSigma = 0.08;
  // Bud ratio where no bud grows: an unbudded mother (near zero, lingering daughters
  // aside) and a dead one (a last bud that never separates, granules taken for buds;
  // kept at its starting value, see EmissionStatistics::estimate).
  double budRatioUnbuddedMean = 0.02, budRatioUnbuddedSigma = 0.05;
  double budRatioDeadMean = 0.15, budRatioDeadSigma = 0.2;
  double budRatioRange = 1.5;  // uniform density for the outlier component
  // Departed area: large in the frame just after a separation, small otherwise.
  double departSeparatedMean = 0.3, departSeparatedSigma = 0.2;
  double departOtherMean = 0.01, departOtherSigma = 0.05;
  // P(dead look | state group).
  std::array<double, kStateGroupCount> deadLook{};
  double deadPrior = 0.5;  // prior under which deadLook was calibrated
  // Morphology relative to the live baseline: spread while alive, mean by dead age.
  std::array<double, kMorphCount> morphLiveSigma{1, 1, 1};
  std::array<double, kMorphCount> morphDeadSigma{1, 1, 1};
  std::vector<std::array<double, kMorphCount>> morphDeadMean;  // K entries
  double outlier = 0.01;  // robust mixture weight of every channel
  // The mother's own measurements (morphology and bud ratio) come from one
  // outline: when segmentation splits, merges or half-misses her they are all
  // wrong at once. So they share one misreading component of this weight,
  // uniform over every feature, instead of an outlier term each (which would
  // count one bad outline several times and make "no mother" cheaper than a
  // misread one). A starting value, not learned; presence is the occupancy
  // channel's evidence, not theirs.
  double misread = 0.05;

  // Common-practice starting values for a model with `buddedFrames` bud ages and
  // `deadFrames` dead ages.
  static EmissionParams defaults(int buddedFrames, int deadFrames = 1);
};

// A trap's morphology baseline per frame ([frames] x kMorphCount); NaN where none.
using MorphBaseline = std::vector<std::array<double, kMorphCount>>;

// The position's live reference per frame: per feature, the median over the traps whose
// mother is alive (P(live) > 1/2) in that frame, so lamp flicker, focus and the
// mothers' common ageing cancel; the median over all live trap-frames where fewer than
// five traps are alive.
MorphBaseline liveReference(const std::vector<TrapEvidence>& evidence,
                            const std::vector<std::vector<float>>& pLive);

// A trap's own local live baseline: averages of each feature over its other frames,
// weighted by P(live) and by exp(-|dt| / window), so a mother growing with age keeps a
// fresh reference and a dead frame is compared with the live frames nearest to it.
// Used once the position-wide reference has said where the live frames are.
MorphBaseline localBaseline(const TrapEvidence& evidence, const std::vector<float>& pLive,
                            double windowFrames);

// Starting values for the change after death, from the data: the dead frames are the
// long tail of each feature's deviation from the live reference; the side of the longer
// tail gives the direction and its far quantile the size, reached at the oldest age.
void initialiseDeadMorphology(EmissionParams& params, const std::vector<TrapEvidence>& evidence,
                              const std::vector<MorphBaseline>& baselines);

// [frames x states] log-likelihoods of one trap's evidence.
std::vector<double> emissionLogLikelihood(const CycleModel& model, const EmissionParams& params,
                                          const TrapEvidence& evidence,
                                          const MorphBaseline* baseline = nullptr);

// Sufficient statistics for re-estimating EmissionParams from state posteriors
// (the M step of Baum-Welch, Rabiner 1989 sec. III.C), pooled over traps.
class EmissionStatistics {
 public:
  EmissionStatistics(int buddedFrames, int deadFrames);
  void add(const CycleModel& model, const EmissionParams& params, const TrapEvidence& evidence,
           const std::vector<double>& statePosterior, const MorphBaseline* baseline = nullptr);
  void merge(const EmissionStatistics& other);
  // Re-estimated parameters; `prior` supplies pseudo-counts of weight `priorWeight` per row.
  EmissionParams estimate(const EmissionParams& prior, double priorWeight) const;

 private:
  std::array<std::array<double, 4>, kStateGroupCount> occ_{};
  std::array<std::array<double, 2>, kStateGroupCount> dead_{};
  std::vector<double> ratioW_, ratioSum_, ratioSq_;
  double unbuddedW_ = 0, unbuddedSum_ = 0, unbuddedSq_ = 0;
  std::array<double, 2> departW_{}, departSum_{}, departSq_{};  // just separated, other
  std::array<double, kMorphCount> liveW_{}, liveSq_{};
  std::vector<std::array<double, kMorphCount>> deadW_, deadSum_, deadSq_;
};

}  // namespace budledger::propose
