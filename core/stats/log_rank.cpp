#include "core/stats/log_rank.h"

#include <cmath>

#include "core/stats/distributions.h"
#include "core/stats/small_matrix.h"

namespace budledger::stats {

using detail::Real;

namespace {

// Adds one stratum's contribution to o, e and v (k groups).
void addStratum(const Cohort& cohort, std::size_t s, double rho, std::vector<Real>& o,
                std::vector<Real>& e, std::vector<Real>& v) {
  const std::size_t k = cohort.groups().size();
  // Each group's tally in this stratum, walked in step over the union of times.
  std::vector<const Tally*> cells(k);
  std::vector<std::size_t> pos(k, 0);
  std::vector<long> risk(k, 0);
  long total = 0;
  for (std::size_t g = 0; g < k; ++g) {
    cells[g] = &cohort.cell(g, s);
    risk[g] = tallySize(*cells[g]);
    total += risk[g];
  }
  Real km = 1.0L;  // pooled Kaplan–Meier just before the current time
  std::vector<long> deaths(k), leaving(k);
  while (total > 0) {
    int t = 0;
    bool first = true;
    for (std::size_t g = 0; g < k; ++g) {
      if (pos[g] < cells[g]->size() && (first || (*cells[g])[pos[g]].time < t)) {
        t = (*cells[g])[pos[g]].time;
        first = false;
      }
    }
    long d = 0, out = 0;
    for (std::size_t g = 0; g < k; ++g) {
      deaths[g] = leaving[g] = 0;
      if (pos[g] < cells[g]->size() && (*cells[g])[pos[g]].time == t) {
        deaths[g] = (*cells[g])[pos[g]].events;
        leaving[g] = (*cells[g])[pos[g]].total();
        ++pos[g];
      }
      d += deaths[g];
      out += leaving[g];
    }
    if (d > 0) {
      const Real w = rho == 0.0 ? 1.0L : std::pow(km, Real(rho));
      const Real n = Real(total), dd = Real(d);
      for (std::size_t g = 0; g < k; ++g) {
        o[g] += w * Real(deaths[g]);
        e[g] += w * dd * Real(risk[g]) / n;
      }
      if (total > 1) {
        const Real kt = w * w * dd * (n - dd) / (n * (n - 1.0L));
        for (std::size_t i = 0; i < k; ++i) {
          for (std::size_t j = 0; j < k; ++j) {
            const Real pj = Real(risk[j]) / n;
            v[i * k + j] += kt * Real(risk[i]) * ((i == j ? 1.0L : 0.0L) - pj);
          }
        }
      }
      km *= (n - dd) / n;
    }
    for (std::size_t g = 0; g < k; ++g) risk[g] -= leaving[g];
    total -= out;
  }
}

}  // namespace

LogRankResult logRank(const Cohort& cohort, const LogRankOptions& options) {
  LogRankResult r;
  const std::size_t k = cohort.groups().size();
  r.groups = cohort.groups();
  r.strata = cohort.strata().size();
  std::vector<Real> o(k, 0.0L), e(k, 0.0L), v(k * k, 0.0L);
  for (std::size_t s = 0; s < cohort.strata().size(); ++s)
    addStratum(cohort, s, options.rho, o, e, v);
  for (std::size_t g = 0; g < k; ++g) {
    r.n.push_back(tallySize(cohort.groupTally(g)));
    r.observed.push_back(double(o[g]));
    r.expected.push_back(double(e[g]));
  }
  for (Real x : v) r.variance.push_back(double(x));

  std::vector<std::size_t> used;
  for (std::size_t g = 0; g < k; ++g) {
    if (e[g] > 0.0L) used.push_back(g);
  }
  if (used.size() < 2) {
    r.problem = k < 2 ? "only one group" : "fewer than two groups have mothers at risk at a death";
    return r;
  }
  // Drop the first used group: the remaining (O − E) and V have full rank.
  const std::size_t p = used.size() - 1;
  detail::SymMatrix vv(p);
  std::vector<Real> diff(p);
  for (std::size_t i = 0; i < p; ++i) {
    diff[i] = o[used[i + 1]] - e[used[i + 1]];
    for (std::size_t j = 0; j < p; ++j) vv(i, j) = v[used[i + 1] * k + used[j + 1]];
  }
  auto l = detail::cholesky(vv);
  if (!l) {
    r.problem = "the variance matrix is singular (groups never at risk together)";
    return r;
  }
  auto sol = detail::choleskySolve(*l, diff);
  Real chi = 0.0L;
  for (std::size_t i = 0; i < p; ++i) chi += sol[i] * diff[i];
  r.defined = true;
  r.chiSquare = double(chi);
  r.df = int(p);
  r.pValue = chiSquareUpperTail(r.chiSquare, r.df);
  return r;
}

}  // namespace budledger::stats
