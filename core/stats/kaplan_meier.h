#pragma once
// Kaplan–Meier estimate of survival over divisions with right censoring
// (Kaplan & Meier 1958), Greenwood's variance (Greenwood 1926) and pointwise
// confidence intervals on the log (default), log-log or plain scale.
//
// Conventions (docs/statistics.md; the same as R survival 3.5-3 survfit):
//  - A mother censored at time t is still at risk at t: deaths come before
//    censorings at equal times.
//  - The curve has one step per distinct time, deaths or censorings; S is
//    right-continuous (the value just after the deaths at that time).
//  - Intervals are undefined where the transform is: at S = 0 for every
//    transform, and also at S = 1 for log-log. Undefined is an empty optional,
//    never NaN. The log interval's upper end is capped at 1.
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "core/stats/cohort.h"

namespace budledger::stats {

enum class ConfidenceTransform { Log, LogLog, Plain };

struct KaplanMeierOptions {
  double confidenceLevel = 0.95;
  ConfidenceTransform transform = ConfidenceTransform::Log;
};

struct SurvivalStep {
  int time = 0;
  long nRisk = 0;   // at risk just before `time` (time >= this)
  long nEvent = 0;  // deaths at `time`
  long nCensor = 0;
  double survival = 1.0;
  // Greenwood's sum Σ d/(n(n−d)), the variance of log S; +infinity once S is 0.
  double varLogSurvival = 0.0;
  std::optional<double> stdErr;  // Greenwood standard error of S (none at S = 0)
  std::optional<double> lower;
  std::optional<double> upper;
};

struct CensorMark {
  int time = 0;
  double survival = 1.0;  // height of the curve at the mark
  long count = 0;         // censorings at this time
};

// Step-function data for one group: enough to draw the curve, its band, its
// censor marks and a number-at-risk table.
struct SurvivalCurve {
  std::string group;
  long n = 0;
  long events = 0;
  KaplanMeierOptions options;
  std::vector<SurvivalStep> steps;  // ascending time

  double survivalAt(double t) const;  // S(t); 1 before the first step
  long atRisk(double t) const;        // mothers with lifespan >= t
  std::vector<CensorMark> censorMarks() const;
  std::optional<int> lastTime() const;
};

SurvivalCurve kaplanMeier(const Tally& tally, const KaplanMeierOptions& options = {},
                          std::string group = {});
// One curve per group of the cohort, pooled over strata, in label order.
std::vector<SurvivalCurve> kaplanMeierByGroup(const Cohort& cohort,
                                              const KaplanMeierOptions& options = {});

struct AtRiskEntry {
  int time = 0;
  long nRisk = 0;
};
// The number-at-risk row printed under a plot, at the chosen times.
std::vector<AtRiskEntry> numberAtRisk(const SurvivalCurve& curve, std::span<const int> times);

// The pointwise interval at one step, for the curve's options.
void confidenceInterval(const KaplanMeierOptions& options, double z, SurvivalStep& step);

}  // namespace budledger::stats
