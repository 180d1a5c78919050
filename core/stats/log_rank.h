#pragma once
// Comparison of two or more survival curves: the log-rank test (Mantel 1966;
// Peto & Peto 1972), optionally stratified, with Fleming–Harrington weights
// S(t−)^rho where S is the Kaplan–Meier estimate of the pooled stratum just
// before t; rho = 1 gives the Peto–Peto form of the Gehan–Wilcoxon test.
//
// Observed, expected and the variance matrix are summed over strata; the
// chi-square statistic uses the groups whose expected count is positive and
// drops the first of them (as R survival 3.5-3 survdiff does), giving df =
// (such groups) − 1. With fewer than two such groups, or a singular variance,
// the test is not defined: `defined` is false and `problem` says why.
#include <span>
#include <string>
#include <vector>

#include "core/stats/cohort.h"

namespace budledger::stats {

struct LogRankOptions {
  double rho = 0.0;  // 0: log-rank; 1: Peto–Peto
  static LogRankOptions logRank() { return {0.0}; }
  static LogRankOptions petoPeto() { return {1.0}; }
};

struct LogRankResult {
  std::vector<std::string> groups;  // cohort order (sorted labels)
  std::vector<long> n;
  std::vector<double> observed;  // weighted deaths
  std::vector<double> expected;
  std::vector<double> variance;  // groups × groups, row-major
  std::size_t strata = 1;
  bool defined = false;
  std::string problem;  // why not defined
  double chiSquare = 0.0;
  int df = 0;
  double pValue = 1.0;
};

// Groups are the cohort's groups; strata its strata (one stratum: unstratified).
LogRankResult logRank(const Cohort& cohort, const LogRankOptions& options = {});

}  // namespace budledger::stats
