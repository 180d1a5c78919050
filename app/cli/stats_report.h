#pragma once
// StatsReport: everything `budledger-cli stats` prints, computed once from the
// lifespans and rendered as text (for people), CSV (the Kaplan–Meier table or
// a long summary table, for spreadsheets) or JSON (the same numbers at full
// precision, for programs). Undefined values print as "not reached", "NA" or
// null, never as NaN.
#include <string>
#include <vector>

#include "core/stats/stats.h"

namespace budledger::cli {

struct StatsReportOptions {
  stats::KaplanMeierOptions km;
  std::optional<double> horizon;  // restricted-mean horizon; none: the common horizon
  std::string source;             // input file, for the heading
  std::string groupColumn;        // empty: one group
  std::string stratumColumn;      // empty: unstratified
};

struct GroupReport {
  stats::SurvivalCurve curve;
  stats::QuantileEstimate median;
  std::vector<stats::QuantileEstimate> quartiles;  // 25% and 75%
  stats::RestrictedMean restricted;
  stats::GompertzFit gompertz;
  stats::WeibullFit weibull;
};

struct StatsReport {
  StatsReportOptions options;
  long lifespans = 0;
  long deaths = 0;
  std::vector<std::string> strata;
  std::vector<GroupReport> groups;
  stats::LogRankResult logRank;
  stats::LogRankResult petoPeto;
  stats::CoxGroupComparison cox;
};

StatsReport computeStatsReport(const std::vector<stats::Lifespan>& lifespans,
                               const StatsReportOptions& options);

std::string renderText(const StatsReport& r);
std::string renderKaplanMeierCsv(const StatsReport& r);
std::string renderSummaryCsv(const StatsReport& r);
std::string renderJson(const StatsReport& r);

}  // namespace budledger::cli
