#pragma once
// SparseHmm: a hidden Markov model with a sparse transition graph, decoded in
// log space. The temporal model of propose/ is one instance; this file knows
// nothing about cells. Each arc carries a tag so callers can ask how likely a
// kind of transition is at each frame.
//
// Invariants: states are 0..stateCount-1; every state has at least one
// outgoing arc whose probabilities sum to 1 (checked by validate()); emission
// matrices are [frames x states] log-likelihoods, where a row of zeros means
// "this frame carries no evidence".
//
// Methods: Viterbi decoding (Viterbi 1967) and the forward-backward algorithm
// for posteriors (Rabiner 1989, "A tutorial on hidden Markov models", sec. III).
#include <cstdint>
#include <string>
#include <vector>

namespace budledger::propose {

struct Arc {
  int from = 0;
  int to = 0;
  double logp = 0;
  int tag = 0;  // caller-defined transition kind
};

class SparseHmm {
 public:
  explicit SparseHmm(int stateCount);

  int stateCount() const { return stateCount_; }
  int addArc(int from, int to, double p, int tag);  // returns the arc index
  void setInitial(int state, double p);
  const std::vector<Arc>& arcs() const { return arcs_; }
  const std::vector<double>& logInitial() const { return logInitial_; }
  // Empty when consistent, else a description of the first problem.
  std::string validate() const;

  // Most likely state path (Viterbi). `emission` is [frames x states].
  std::vector<int> viterbi(const std::vector<double>& emission, int frames) const;

  struct Posteriors {
    double logLikelihood = 0;
    std::vector<double> state;  // [frames x states] P(state at t | all evidence)
    std::vector<double> arc;    // [frames x arcs] P(arc taken into frame t); row 0 is zero
  };
  Posteriors forwardBackward(const std::vector<double>& emission, int frames) const;

 private:
  int stateCount_;
  std::vector<Arc> arcs_;
  std::vector<double> logInitial_;
  std::vector<std::vector<int>> incoming_;  // arc indices by destination
  std::vector<std::vector<int>> outgoing_;  // arc indices by source
};

}  // namespace budledger::propose
