#pragma once
// EmissionModel: how likely a frame's evidence is under each hidden state.
// Three independent channels multiply (naive Bayes):
//  - occupancy: the classifier's posteriors become scaled likelihoods
//    q(c)/prior(c) (Bourlard & Morgan's hybrid HMM), mixed by P(class | state
//    group), a confusion table learned from the data by EM;
//  - bud size: bud/mother area ratio, Gaussian around a mean that grows with
//    the bud's age (only when a bud was measured);
//  - dead look: the morphology score, mixed by P(dead look | state group).
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
  double budRatioRange = 1.5;  // uniform density for states without a growing bud
  // P(dead look | state group).
  std::array<double, kStateGroupCount> deadLook{};
  double deadPrior = 0.5;  // prior under which deadLook was calibrated
  double outlier = 0.01;   // robust mixture weight of every channel

  // Common-practice starting values for a model with `buddedFrames` bud ages.
  static EmissionParams defaults(int buddedFrames);
};

// [frames x states] log-likelihoods of one trap's evidence.
std::vector<double> emissionLogLikelihood(const CycleModel& model, const EmissionParams& params,
                                          const TrapEvidence& evidence);

// Sufficient statistics for re-estimating EmissionParams from state posteriors
// (the M step of Baum-Welch, Rabiner 1989 sec. III.C), pooled over traps.
class EmissionStatistics {
 public:
  explicit EmissionStatistics(int buddedFrames);
  void add(const CycleModel& model, const EmissionParams& params, const TrapEvidence& evidence,
           const std::vector<double>& statePosterior);
  void merge(const EmissionStatistics& other);
  // Re-estimated parameters; `prior` supplies pseudo-counts of weight `priorWeight` per row.
  EmissionParams estimate(const EmissionParams& prior, double priorWeight) const;

 private:
  std::array<std::array<double, 4>, kStateGroupCount> occ_{};
  std::array<std::array<double, 2>, kStateGroupCount> dead_{};
  std::vector<double> ratioW_, ratioSum_, ratioSq_;
};

}  // namespace budledger::propose
