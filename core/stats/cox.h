#pragma once
// Cox proportional-hazards regression (Cox 1972) by Newton–Raphson on the
// partial likelihood, with Efron's (1977, default) or Breslow's handling of
// tied death times, optional strata, and any number of covariates.
// coxByGroup() is the common use: k groups as k − 1 indicator covariates
// against the first label (the reference), giving hazard ratios with
// confidence intervals.
//
// A fit that does not converge — typically a hazard ratio heading to 0 or
// infinity because a group has no deaths — or whose information matrix is
// singular is reported with `problem` set and `estimable` false; its numbers
// are then not to be shown as estimates.
#include <span>
#include <string>
#include <vector>

#include "core/stats/cohort.h"

namespace budledger::stats {

enum class CoxTies { Efron, Breslow };

struct CoxOptions {
  CoxTies ties = CoxTies::Efron;
  int maxIterations = 40;
  double confidenceLevel = 0.95;
  // Tie blocks with at least this many deaths sum Efron's terms in closed form
  // (log-gamma and digamma); the value is the same, the cost O(1) in the block size.
  long efronClosedFormFrom = 4;
};

struct CoxRecord {
  double time = 0.0;
  bool event = false;
  int stratum = 0;
  std::vector<double> covariates;
};

struct CoxFit {
  bool estimable = false;
  std::string problem;
  int iterations = 0;
  std::vector<double> coef;
  std::vector<double> stdErr;
  std::vector<double> covariance;  // p × p, row-major: inverse observed information
  double logLikNull = 0.0;         // at coef = 0
  double logLik = 0.0;
  int df = 0;
  double likelihoodRatio = 0.0, likelihoodRatioP = 1.0;
  double wald = 0.0, waldP = 1.0;
  double score = 0.0, scoreP = 1.0;  // log-rank-like score test at coef = 0
};

CoxFit fitCox(std::span<const CoxRecord> records, const CoxOptions& options = {});

struct HazardRatio {
  std::string group;  // compared with the reference group
  double coef = 0.0;  // log hazard ratio
  double stdErr = 0.0;
  double hazardRatio = 1.0;
  double lower = 0.0, upper = 0.0;
  double pValue = 1.0;  // Wald
};

struct CoxGroupComparison {
  std::string reference;  // first group label
  std::vector<HazardRatio> ratios;
  CoxFit fit;
};

// Groups of the cohort as indicators, stratified by the cohort's strata.
CoxGroupComparison coxByGroup(const Cohort& cohort, const CoxOptions& options = {});

}  // namespace budledger::stats
