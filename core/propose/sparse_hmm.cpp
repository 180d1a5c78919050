#include "core/propose/sparse_hmm.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace budledger::propose {
namespace {

constexpr double kNegInf = -std::numeric_limits<double>::infinity();

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
  // Scaled forward-backward (Rabiner 1989, sec. V.A): each frame's emissions are
  // divided by their largest value and each forward vector is normalised, so the
  // recursions run on plain probabilities; the log-likelihood is the sum of the logs
  // of the scales.
  Posteriors out;
  if (frames <= 0) return out;
  const auto S = static_cast<std::size_t>(stateCount_);
  const auto T = static_cast<std::size_t>(frames);
  const std::size_t A = arcs_.size();
  std::vector<double> p(A);
  for (std::size_t a = 0; a < A; ++a) p[a] = std::exp(arcs_[a].logp);
  std::vector<double> e(T * S), alpha(T * S, 0.0), beta(T * S, 0.0), scale(T, 0.0);
  double logZ = 0;
  for (std::size_t t = 0; t < T; ++t) {
    const double* l = &emission[t * S];
    const double top = *std::max_element(l, l + S);
    if (!std::isfinite(top)) {
      out.logLikelihood = kNegInf;
      out.state.assign(T * S, 0.0);
      out.arc.assign(T * A, 0.0);
      return out;
    }
    logZ += top;
    for (std::size_t s = 0; s < S; ++s) e[t * S + s] = std::exp(l[s] - top);
  }
  auto normalise = [&](std::size_t t) {
    double sum = 0;
    for (std::size_t s = 0; s < S; ++s) sum += alpha[t * S + s];
    scale[t] = sum;
    if (sum > 0)
      for (std::size_t s = 0; s < S; ++s) alpha[t * S + s] /= sum;
    return sum > 0;
  };
  for (std::size_t s = 0; s < S; ++s)
    alpha[s] = (std::isfinite(logInitial_[s]) ? std::exp(logInitial_[s]) : 0.0) * e[s];
  bool possible = normalise(0);
  for (std::size_t t = 1; t < T && possible; ++t) {
    const double* prev = &alpha[(t - 1) * S];
    double* cur = &alpha[t * S];
    for (std::size_t a = 0; a < A; ++a)
      cur[static_cast<std::size_t>(arcs_[a].to)] +=
          prev[static_cast<std::size_t>(arcs_[a].from)] * p[a];
    for (std::size_t s = 0; s < S; ++s) cur[s] *= e[t * S + s];
    possible = normalise(t);
  }
  out.state.assign(T * S, 0.0);
  out.arc.assign(T * A, 0.0);
  if (!possible) {
    out.logLikelihood = kNegInf;  // evidence impossible under the model: no posteriors
    return out;
  }
  for (std::size_t t = 0; t < T; ++t) logZ += std::log(scale[t]);
  out.logLikelihood = logZ;
  for (std::size_t s = 0; s < S; ++s) beta[(T - 1) * S + s] = 1.0;
  for (std::size_t t = T - 1; t-- > 0;) {
    const double* nb = &beta[(t + 1) * S];
    const double* ne = &e[(t + 1) * S];
    double* cur = &beta[t * S];
    for (std::size_t a = 0; a < A; ++a) {
      const auto to = static_cast<std::size_t>(arcs_[a].to);
      cur[static_cast<std::size_t>(arcs_[a].from)] += p[a] * ne[to] * nb[to];
    }
    const double inv = 1.0 / scale[t + 1];
    for (std::size_t s = 0; s < S; ++s) cur[s] *= inv;
  }
  for (std::size_t i = 0; i < T * S; ++i) out.state[i] = alpha[i] * beta[i];
  for (std::size_t t = 1; t < T; ++t) {
    const double inv = 1.0 / scale[t];
    for (std::size_t a = 0; a < A; ++a) {
      const auto from = static_cast<std::size_t>(arcs_[a].from);
      const auto to = static_cast<std::size_t>(arcs_[a].to);
      out.arc[t * A + a] =
          alpha[(t - 1) * S + from] * p[a] * e[t * S + to] * beta[t * S + to] * inv;
    }
  }
  return out;
}

}  // namespace budledger::propose
