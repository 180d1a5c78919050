#include "core/stats/cox.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "core/stats/distributions.h"
#include "core/stats/small_matrix.h"

namespace budledger::stats {

using detail::Real;
using detail::SymMatrix;

namespace {

// ψ and ψ' for x >= 1 by upward recurrence to x >= 20 and the asymptotic series
// (Abramowitz & Stegun 6.3.18, 6.4.12); truncation error below 1e-20 there.
Real digamma(Real x) {
  Real acc = 0.0L;
  while (x < 20.0L) {
    acc -= 1.0L / x;
    x += 1.0L;
  }
  const Real z = 1.0L / (x * x);
  const Real series =
      z * (1.0L / 12 -
           z * (1.0L / 120 -
                z * (1.0L / 252 -
                     z * (1.0L / 240 - z * (1.0L / 132 - z * (691.0L / 32760 - z / 12.0L))))));
  return acc + std::log(x) - 0.5L / x - series;
}

Real trigamma(Real x) {
  Real acc = 0.0L;
  while (x < 20.0L) {
    acc += 1.0L / (x * x);
    x += 1.0L;
  }
  const Real z = 1.0L / (x * x);
  const Real series =
      (1.0L / 6 -
       z * (1.0L / 30 - z * (1.0L / 42 - z * (1.0L / 30 - z * (5.0L / 66 - z * (691.0L / 2730 -
                                                                                z * 7.0L / 6)))))) /
      (x * x * x);
  return acc + 1.0L / x + 0.5L / (x * x) + series;
}

// Identical records collapse into one row with counts: the partial likelihood
// depends on them only through these counts, which keeps group comparisons of
// 100,000 mothers as cheap as their distinct times.
struct Row {
  double time = 0.0;
  int stratum = 0;
  Real events = 0.0L;
  Real censored = 0.0L;
  std::vector<Real> x;
};

struct Evaluation {
  Real logLik = 0.0L;
  std::vector<Real> score;
  SymMatrix info;
};

class PartialLikelihood {
 public:
  PartialLikelihood(std::vector<Row> rows, std::size_t p, CoxTies ties, long closedFormFrom)
      : rows_(std::move(rows)), p_(p), ties_(ties), closedFormFrom_(closedFormFrom) {
    // Within a stratum, descending time: the risk set grows as we walk.
    std::sort(rows_.begin(), rows_.end(), [](const Row& a, const Row& b) {
      return a.stratum != b.stratum ? a.stratum < b.stratum : a.time > b.time;
    });
    // Centre the covariates: risks exp(xβ) stay near 1, the likelihood is unchanged.
    std::vector<Real> mean(p_, 0.0L);
    Real n = 0.0L;
    for (const auto& r : rows_) {
      Real w = r.events + r.censored;
      n += w;
      for (std::size_t j = 0; j < p_; ++j) mean[j] += w * r.x[j];
    }
    for (auto& r : rows_) {
      for (std::size_t j = 0; j < p_; ++j) r.x[j] -= n > 0.0L ? mean[j] / n : 0.0L;
    }
  }

  Evaluation evaluate(const std::vector<Real>& beta) const {
    Evaluation ev{0.0L, std::vector<Real>(p_, 0.0L), SymMatrix(p_)};
    std::vector<Real> s1(p_), d1(p_), t1(p_);
    SymMatrix s2(p_), d2(p_);
    std::size_t i = 0;
    while (i < rows_.size()) {
      const int stratum = rows_[i].stratum;
      Real s0 = 0.0L;
      std::fill(s1.begin(), s1.end(), 0.0L);
      std::fill(s2.a.begin(), s2.a.end(), 0.0L);
      while (i < rows_.size() && rows_[i].stratum == stratum) {
        // One tie block: all rows of this stratum at this time join the risk set.
        const double t = rows_[i].time;
        Real d = 0.0L, d0 = 0.0L;
        std::fill(d1.begin(), d1.end(), 0.0L);
        std::fill(d2.a.begin(), d2.a.end(), 0.0L);
        for (; i < rows_.size() && rows_[i].stratum == stratum && rows_[i].time == t; ++i) {
          const Row& r = rows_[i];
          Real eta = 0.0L;
          for (std::size_t j = 0; j < p_; ++j) eta += beta[j] * r.x[j];
          // exp and log in double, as R does; the sums stay in long double.
          const Real risk = std::exp(double(eta));
          const Real w = (r.events + r.censored) * risk;
          s0 += w;
          for (std::size_t j = 0; j < p_; ++j) {
            s1[j] += w * r.x[j];
            for (std::size_t k = 0; k <= j; ++k) s2(j, k) += w * r.x[j] * r.x[k];
          }
          if (r.events > 0.0L) {
            const Real wd = r.events * risk;
            d += r.events;
            d0 += wd;
            ev.logLik += r.events * eta;
            for (std::size_t j = 0; j < p_; ++j) {
              ev.score[j] += r.events * r.x[j];
              d1[j] += wd * r.x[j];
              for (std::size_t k = 0; k <= j; ++k) d2(j, k) += wd * r.x[j] * r.x[k];
            }
          }
        }
        if (d == 0.0L) continue;
        const long deaths = long(std::llround(d));
        if (ties_ == CoxTies::Efron && deaths >= closedFormFrom_) {
          addEfronClosedForm(ev, d, s0, d0, s1, d1, s2, d2);
          continue;
        }
        // Efron: the l-th of d tied deaths sees the risk set less l/d of the dying.
        const long terms = ties_ == CoxTies::Efron ? deaths : 1;
        const Real mult = ties_ == CoxTies::Efron ? 1.0L : d;
        for (long l = 0; l < terms; ++l) {
          const Real f = ties_ == CoxTies::Efron ? Real(l) / d : 0.0L;
          const Real a0 = s0 - f * d0;
          ev.logLik -= mult * std::log(double(a0));
          for (std::size_t j = 0; j < p_; ++j) {
            t1[j] = (s1[j] - f * d1[j]) / a0;
            ev.score[j] -= mult * t1[j];
          }
          for (std::size_t j = 0; j < p_; ++j) {
            for (std::size_t k = 0; k <= j; ++k) {
              ev.info(j, k) += mult * ((s2(j, k) - f * d2(j, k)) / a0 - t1[j] * t1[k]);
            }
          }
        }
      }
    }
    for (std::size_t j = 0; j < p_; ++j) {
      for (std::size_t k = 0; k < j; ++k) ev.info(k, j) = ev.info(j, k);
    }
    return ev;
  }

 private:
  // Efron's d terms of one tie block summed in closed form. Writing the l-th
  // denominator as (d0/d)(c − l) with c = s0·d/d0, the sums over l reduce to
  // Σ log(c − l) = lnΓ(c+1) − lnΓ(c−d+1), Σ 1/(c − l) = ψ(c+1) − ψ(c−d+1) and
  // Σ 1/(c − l)² = ψ'(c−d+1) − ψ'(c+1); large blocks then cost O(p²), not O(d p²).
  void addEfronClosedForm(Evaluation& ev, Real d, Real s0, Real d0, const std::vector<Real>& s1,
                          const std::vector<Real>& d1, const SymMatrix& s2,
                          const SymMatrix& d2) const {
    const Real c = s0 * d / d0;
    const Real h1 = digamma(c + 1.0L) - digamma(c - d + 1.0L);
    const Real h2 = trigamma(c - d + 1.0L) - trigamma(c + 1.0L);
    const Real q = d / d0, ratio = s0 / d0;
    ev.logLik -= d * std::log(d0 / d) + std::lgamma(c + 1.0L) - std::lgamma(c - d + 1.0L);
    std::vector<Real> r(p_);
    for (std::size_t j = 0; j < p_; ++j) {
      r[j] = s1[j] - ratio * d1[j];
      ev.score[j] -= q * (r[j] * h1 + d1[j]);
    }
    for (std::size_t j = 0; j < p_; ++j) {
      for (std::size_t k = 0; k <= j; ++k) {
        const Real first = q * ((s2(j, k) - ratio * d2(j, k)) * h1 + d2(j, k));
        const Real second =
            q * q * (r[j] * r[k] * h2 + (r[j] * d1[k] + d1[j] * r[k]) * h1 / d + d1[j] * d1[k] / d);
        ev.info(j, k) += first - second;
      }
    }
  }

  std::vector<Row> rows_;
  std::size_t p_;
  CoxTies ties_;
  long closedFormFrom_;
};

CoxFit fitRows(std::vector<Row> rows, std::size_t p, const CoxOptions& options) {
  CoxFit fit;
  fit.df = int(p);
  Real deaths = 0.0L;
  for (const auto& r : rows) deaths += r.events;
  if (p == 0) {
    fit.problem = "no covariates";
    return fit;
  }
  if (deaths == 0.0L) {
    fit.problem = "no deaths";
    return fit;
  }
  PartialLikelihood pl(std::move(rows), p, options.ties, options.efronClosedFormFrom);
  std::vector<Real> beta(p, 0.0L);
  Evaluation cur = pl.evaluate(beta);
  fit.logLikNull = double(cur.logLik);

  auto l0 = detail::cholesky(cur.info);
  if (!l0) {
    fit.problem = "the information matrix is singular: a coefficient cannot be estimated";
    return fit;
  }
  {
    auto u = detail::choleskySolve(*l0, cur.score);
    Real sc = 0.0L;
    for (std::size_t j = 0; j < p; ++j) sc += u[j] * cur.score[j];
    fit.score = double(sc);
    fit.scoreP = chiSquareUpperTail(fit.score, double(p));
  }

  bool converged = false;
  int iter = 0;
  for (; iter < options.maxIterations && !converged; ++iter) {
    auto l = detail::cholesky(cur.info);
    if (!l) break;
    auto step = detail::choleskySolve(*l, cur.score);
    std::vector<Real> next(p);
    for (std::size_t j = 0; j < p; ++j) next[j] = beta[j] + step[j];
    Evaluation cand = pl.evaluate(next);
    // Step halving while the likelihood falls (Newton overshoot far from the optimum).
    for (int h = 0; h < 60 && !(cand.logLik >= cur.logLik - 1e-15L * std::fabs(cur.logLik)); ++h) {
      for (std::size_t j = 0; j < p; ++j) next[j] = (beta[j] + next[j]) / 2.0L;
      cand = pl.evaluate(next);
    }
    Real biggest = 0.0L;
    for (std::size_t j = 0; j < p; ++j) {
      biggest = std::fmax(biggest, std::fabs(next[j] - beta[j]) / (1.0L + std::fabs(next[j])));
    }
    beta = std::move(next);
    cur = std::move(cand);
    converged = biggest < 1e-11L;
  }
  fit.iterations = iter;
  fit.logLik = double(cur.logLik);
  for (Real b : beta) fit.coef.push_back(double(b));
  auto l = detail::cholesky(cur.info);
  if (l) {
    SymMatrix inv = detail::choleskyInverse(*l);
    for (Real v : inv.a) fit.covariance.push_back(double(v));
    Real w = 0.0L;
    for (std::size_t j = 0; j < p; ++j) {
      fit.stdErr.push_back(double(std::sqrt(inv(j, j))));
      for (std::size_t k = 0; k < p; ++k) w += beta[j] * cur.info(j, k) * beta[k];
    }
    fit.wald = double(w);
    fit.waldP = chiSquareUpperTail(fit.wald, double(p));
  }
  fit.likelihoodRatio = double(2.0L * (cur.logLik - Real(fit.logLikNull)));
  fit.likelihoodRatioP = chiSquareUpperTail(std::max(fit.likelihoodRatio, 0.0), double(p));
  if (!l) {
    fit.problem = "the information matrix is singular: a coefficient cannot be estimated";
  } else if (!converged) {
    fit.problem =
        "did not converge: a hazard ratio may be 0 or infinite (a group with no deaths, or "
        "deaths only where another group is not at risk)";
  } else {
    fit.estimable = true;
  }
  return fit;
}

}  // namespace

CoxFit fitCox(std::span<const CoxRecord> records, const CoxOptions& options) {
  if (records.empty()) {
    CoxFit fit;
    fit.problem = "no records";
    return fit;
  }
  const std::size_t p = records.front().covariates.size();
  std::vector<Row> rows;
  rows.reserve(records.size());
  for (const auto& r : records) {
    if (r.covariates.size() != p) {
      throw std::invalid_argument("fitCox: records differ in their number of covariates");
    }
    Row row;
    row.time = r.time;
    row.stratum = r.stratum;
    (r.event ? row.events : row.censored) = 1.0L;
    row.x.assign(r.covariates.begin(), r.covariates.end());
    rows.push_back(std::move(row));
  }
  return fitRows(std::move(rows), p, options);
}

CoxGroupComparison coxByGroup(const Cohort& cohort, const CoxOptions& options) {
  CoxGroupComparison out;
  const std::size_t k = cohort.groups().size();
  if (k > 0) out.reference = cohort.groups().front();
  if (k < 2) {
    out.fit.problem = "needs two or more groups";
    return out;
  }
  const std::size_t p = k - 1;
  std::vector<Row> rows;
  for (std::size_t g = 0; g < k; ++g) {
    for (std::size_t s = 0; s < cohort.strata().size(); ++s) {
      for (const auto& c : cohort.cell(g, s)) {
        Row row;
        row.time = c.time;
        row.stratum = int(s);
        row.events = Real(c.events);
        row.censored = Real(c.censored);
        row.x.assign(p, 0.0L);
        if (g > 0) row.x[g - 1] = 1.0L;
        rows.push_back(std::move(row));
      }
    }
  }
  out.fit = fitRows(std::move(rows), p, options);
  if (!out.fit.estimable) return out;
  const double z = twoSidedZ(options.confidenceLevel);
  for (std::size_t j = 0; j < p; ++j) {
    HazardRatio hr;
    hr.group = cohort.groups()[j + 1];
    hr.coef = out.fit.coef[j];
    hr.stdErr = out.fit.stdErr[j];
    hr.hazardRatio = std::exp(hr.coef);
    hr.lower = std::exp(hr.coef - z * hr.stdErr);
    hr.upper = std::exp(hr.coef + z * hr.stdErr);
    hr.pValue = chiSquareUpperTail(hr.coef * hr.coef / (hr.stdErr * hr.stdErr), 1.0);
    out.ratios.push_back(hr);
  }
  return out;
}

}  // namespace budledger::stats
