#include "core/propose/sparse_hmm.h"

#include <gtest/gtest.h>

#include <cmath>
#include <functional>

namespace budledger::propose {
namespace {

// A three-state model small enough to enumerate every path: Viterbi must find
// the best path and forward-backward the exact marginals (definitions in
// Rabiner 1989, eqs. 18-27 and 30-35).
struct Tiny {
  SparseHmm hmm{3};
  std::vector<double> emission;
  int frames = 6;
  Tiny() {
    hmm.addArc(0, 0, 0.7, 0);
    hmm.addArc(0, 1, 0.3, 1);
    hmm.addArc(1, 1, 0.5, 0);
    hmm.addArc(1, 2, 0.4, 2);
    hmm.addArc(1, 0, 0.1, 3);
    hmm.addArc(2, 2, 1.0, 0);
    hmm.setInitial(0, 0.6);
    hmm.setInitial(1, 0.4);
    const double e[6][3] = {{0.9, 0.2, 0.1}, {0.5, 0.5, 0.1}, {0.1, 0.8, 0.3},
                            {0.2, 0.6, 0.7}, {0.3, 0.1, 0.9}, {0.5, 0.4, 0.6}};
    for (auto& row : e)
      for (double v : row) emission.push_back(std::log(v));
  }
  double transition(int a, int b) const {
    for (const auto& arc : hmm.arcs())
      if (arc.from == a && arc.to == b) return std::exp(arc.logp);
    return 0;
  }
};

TEST(SparseHmm, ViterbiAndPosteriorsMatchEnumeration) {
  Tiny m;
  ASSERT_EQ(m.hmm.validate(), "");
  std::vector<int> path(static_cast<std::size_t>(m.frames));
  double best = -1, total = 0;
  std::vector<int> bestPath;
  std::vector<double> marginal(static_cast<std::size_t>(m.frames) * 3, 0.0);
  double arc12At3 = 0;  // P(state 1 at frame 2 and state 2 at frame 3)
  std::function<void(int)> walk = [&](int t) {
    if (t == m.frames) {
      double p = std::exp(m.hmm.logInitial()[static_cast<std::size_t>(path[0])]);
      for (int u = 0; u < m.frames; ++u) {
        if (u > 0)
          p *= m.transition(path[static_cast<std::size_t>(u - 1)],
                            path[static_cast<std::size_t>(u)]);
        p *= std::exp(
            m.emission[static_cast<std::size_t>(u * 3 + path[static_cast<std::size_t>(u)])]);
      }
      total += p;
      for (int u = 0; u < m.frames; ++u)
        marginal[static_cast<std::size_t>(u * 3 + path[static_cast<std::size_t>(u)])] += p;
      if (path[2] == 1 && path[3] == 2) arc12At3 += p;
      if (p > best) {
        best = p;
        bestPath = path;
      }
      return;
    }
    for (int s = 0; s < 3; ++s) {
      path[static_cast<std::size_t>(t)] = s;
      walk(t + 1);
    }
  };
  walk(0);
  EXPECT_EQ(m.hmm.viterbi(m.emission, m.frames), bestPath);
  const auto post = m.hmm.forwardBackward(m.emission, m.frames);
  EXPECT_NEAR(post.logLikelihood, std::log(total), 1e-9);
  for (std::size_t i = 0; i < marginal.size(); ++i)
    EXPECT_NEAR(post.state[i], marginal[i] / total, 1e-9) << i;
  // Arc 1 -> 2 is index 3; into frame 3.
  EXPECT_NEAR(post.arc[3 * m.hmm.arcs().size() + 3], arc12At3 / total, 1e-9);
}

TEST(SparseHmm, RowOfZerosCarriesNoEvidence) {
  Tiny m;
  auto flat = m.emission;
  for (int s = 0; s < 3; ++s) flat[static_cast<std::size_t>(3 * 3 + s)] = 0;
  const auto a = m.hmm.forwardBackward(flat, m.frames);
  // With frame 3 uninformative, its marginal is the one-step prediction from
  // the others: posteriors still sum to one and the likelihood is finite.
  double sum = 0;
  for (int s = 0; s < 3; ++s) sum += a.state[static_cast<std::size_t>(9 + s)];
  EXPECT_NEAR(sum, 1.0, 1e-12);
  EXPECT_TRUE(std::isfinite(a.logLikelihood));
}

TEST(SparseHmm, ValidateReportsBadRows) {
  SparseHmm h(2);
  h.addArc(0, 0, 0.5, 0);
  h.addArc(1, 1, 1.0, 0);
  h.setInitial(0, 1.0);
  EXPECT_NE(h.validate(), "");
}

}  // namespace
}  // namespace budledger::propose
