#include "core/propose/sparse_hmm.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace budledger::propose {
namespace {

constexpr double kNegInf = -std::numeric_limits<double>::infinity();

double logAdd(double a, double b) {
  if (a == kNegInf) return b;
  if (b == kNegInf) return a;
  return a > b ? a + std::log1p(std::exp(b - a)) : b + std::log1p(std::exp(a - b));
}

double safeLog(double p) { return p > 0 ? std::log(p) : kNegInf; }

}  // namespace

SparseHmm::SparseHmm(int stateCount)
    : stateCount_(stateCount),
      logInitial_(static_cast<std::size_t>(stateCount), kNegInf),
      incoming_(static_cast<std::size_t>(stateCount)),
      outgoing_(static_cast<std::size_t>(stateCount)) {
  if (stateCount <= 0) throw std::invalid_argument("SparseHmm needs at least one state");
}

int SparseHmm::addArc(int from, int to, double p, int tag) {
  if (from < 0 || from >= stateCount_ || to < 0 || to >= stateCount_)
    throw std::invalid_argument("SparseHmm arc outside the state range");
  if (p <= 0) return -1;  // an impossible arc is simply absent
  const int index = static_cast<int>(arcs_.size());
  arcs_.push_back(Arc{from, to, std::log(p), tag});
  incoming_[static_cast<std::size_t>(to)].push_back(index);
  outgoing_[static_cast<std::size_t>(from)].push_back(index);
  return index;
}

void SparseHmm::setInitial(int state, double p) {
  logInitial_.at(static_cast<std::size_t>(state)) = safeLog(p);
}

std::string SparseHmm::validate() const {
  double initial = 0;
  for (double l : logInitial_) initial += l == kNegInf ? 0 : std::exp(l);
  if (std::abs(initial - 1) > 1e-6) return fmt::format("initial probabilities sum to {}", initial);
  for (int s = 0; s < stateCount_; ++s) {
    double sum = 0;
    for (int a : outgoing_[static_cast<std::size_t>(s)])
      sum += std::exp(arcs_[static_cast<std::size_t>(a)].logp);
    if (std::abs(sum - 1) > 1e-6) return fmt::format("arcs leaving state {} sum to {}", s, sum);
  }
  return {};
}

std::vector<int> SparseHmm::viterbi(const std::vector<double>& emission, int frames) const {
  std::vector<int> path;
  if (frames <= 0) return path;
  const auto S = static_cast<std::size_t>(stateCount_);
  std::vector<double> score(S), next(S);
  std::vector<int> back(static_cast<std::size_t>(frames) * S, -1);
  for (std::size_t s = 0; s < S; ++s) score[s] = logInitial_[s] + emission[s];
  for (int t = 1; t < frames; ++t) {
    const double* e = &emission[static_cast<std::size_t>(t) * S];
    int* bt = &back[static_cast<std::size_t>(t) * S];
    for (std::size_t s = 0; s < S; ++s) {
      double best = kNegInf;
      int arg = -1;
      for (int a : incoming_[s]) {
        const Arc& arc = arcs_[static_cast<std::size_t>(a)];
        const double v = score[static_cast<std::size_t>(arc.from)] + arc.logp;
        if (v > best) {
          best = v;
          arg = arc.from;
        }
      }
      next[s] = best + e[s];
      bt[s] = arg;
    }
    score.swap(next);
  }
  path.resize(static_cast<std::size_t>(frames));
  int last = static_cast<int>(std::max_element(score.begin(), score.end()) - score.begin());
  for (int t = frames - 1; t >= 0; --t) {
    path[static_cast<std::size_t>(t)] = last;
    if (t > 0) last = back[static_cast<std::size_t>(t) * S + static_cast<std::size_t>(last)];
  }
  return path;
}

SparseHmm::Posteriors SparseHmm::forwardBackward(const std::vector<double>& emission,
                                                 int frames) const {
  Posteriors out;
  if (frames <= 0) return out;
  const auto S = static_cast<std::size_t>(stateCount_);
  const auto T = static_cast<std::size_t>(frames);
  const std::size_t A = arcs_.size();
  std::vector<double> alpha(T * S, kNegInf), beta(T * S, kNegInf);
  for (std::size_t s = 0; s < S; ++s) alpha[s] = logInitial_[s] + emission[s];
  for (std::size_t t = 1; t < T; ++t) {
    const double* prev = &alpha[(t - 1) * S];
    double* cur = &alpha[t * S];
    for (std::size_t s = 0; s < S; ++s) {
      double acc = kNegInf;
      for (int a : incoming_[s]) {
        const Arc& arc = arcs_[static_cast<std::size_t>(a)];
        acc = logAdd(acc, prev[static_cast<std::size_t>(arc.from)] + arc.logp);
      }
      cur[s] = acc + emission[t * S + s];
    }
  }
  for (std::size_t s = 0; s < S; ++s) beta[(T - 1) * S + s] = 0;
  for (std::size_t t = T - 1; t-- > 0;) {
    const double* nextBeta = &beta[(t + 1) * S];
    const double* nextEmission = &emission[(t + 1) * S];
    double* cur = &beta[t * S];
    for (std::size_t s = 0; s < S; ++s) {
      double acc = kNegInf;
      for (int a : outgoing_[s]) {
        const Arc& arc = arcs_[static_cast<std::size_t>(a)];
        const auto to = static_cast<std::size_t>(arc.to);
        acc = logAdd(acc, arc.logp + nextEmission[to] + nextBeta[to]);
      }
      cur[s] = acc;
    }
  }
  double logZ = kNegInf;
  for (std::size_t s = 0; s < S; ++s) logZ = logAdd(logZ, alpha[(T - 1) * S + s]);
  out.logLikelihood = logZ;
  out.state.assign(T * S, 0.0);
  out.arc.assign(T * A, 0.0);
  if (logZ == kNegInf) return out;  // evidence impossible under the model: no posteriors
  for (std::size_t i = 0; i < T * S; ++i) out.state[i] = std::exp(alpha[i] + beta[i] - logZ);
  for (std::size_t t = 1; t < T; ++t) {
    for (std::size_t a = 0; a < A; ++a) {
      const Arc& arc = arcs_[a];
      const auto from = static_cast<std::size_t>(arc.from);
      const auto to = static_cast<std::size_t>(arc.to);
      out.arc[t * A + a] = std::exp(alpha[(t - 1) * S + from] + arc.logp + emission[t * S + to] +
                                    beta[t * S + to] - logZ);
    }
  }
  return out;
}

}  // namespace budledger::propose
