// budledger-cli stats lifespans.csv [--group-by COLUMN] [--strata COLUMN]
//                                   [--format text|csv|json] — lifespan
// statistics from a lifespans export: Kaplan–Meier tables, medians with
// confidence intervals, restricted means, log-rank and Peto–Peto tests, Cox
// hazard ratios, Gompertz and Weibull fits.
#include <fmt/format.h>

#include <map>
#include <memory>
#include <optional>
#include <string>

#include "app/cli/cli_support.h"
#include "app/cli/commands.h"
#include "app/cli/lifespans_csv.h"
#include "app/cli/stats_report.h"

namespace budledger::cli {

namespace {

struct StatsArgs {
  std::string path;
  std::string groupBy;
  std::string strata;
  std::string format = "text";
  std::string table = "km";
  std::string confType = "log";
  double confLevel = 0.95;
  std::optional<double> horizon;
};

int runStats(const StatsArgs& a) {
  LifespanCsvOptions csv;
  if (!a.groupBy.empty()) csv.groupColumn = a.groupBy;
  if (!a.strata.empty()) csv.stratumColumn = a.strata;
  const auto lifespans = readLifespansCsv(a.path, csv);

  StatsReportOptions opt;
  opt.source = a.path;
  opt.groupColumn = a.groupBy;
  opt.stratumColumn = a.strata;
  opt.km.confidenceLevel = a.confLevel;
  opt.km.transform = a.confType == "log-log" ? stats::ConfidenceTransform::LogLog
                     : a.confType == "plain" ? stats::ConfidenceTransform::Plain
                                             : stats::ConfidenceTransform::Log;
  opt.horizon = a.horizon;
  const StatsReport report = computeStatsReport(lifespans, opt);

  if (a.format == "json") {
    fmt::print("{}", renderJson(report));
  } else if (a.format == "csv") {
    fmt::print("{}",
               a.table == "summary" ? renderSummaryCsv(report) : renderKaplanMeierCsv(report));
  } else {
    fmt::print("{}", renderText(report));
  }
  return 0;
}

}  // namespace

void addStatsCommand(CLI::App& root, Action& action) {
  auto* sub = root.add_subcommand(
      "stats",
      "Lifespan statistics from a lifespans CSV export: Kaplan-Meier, medians, log-rank, Cox, "
      "Gompertz and Weibull fits");
  auto args = std::make_shared<StatsArgs>();
  sub->add_option("lifespans", args->path, "Lifespans CSV (columns include divisions, outcome)")
      ->required();
  sub->add_option("--group-by", args->groupBy, "Column whose values define the groups compared");
  sub->add_option("--strata", args->strata, "Column whose values define strata (stratified tests)");
  sub->add_option("--format", args->format, "Output format")
      ->check(CLI::IsMember({"text", "csv", "json"}))
      ->capture_default_str();
  sub->add_option("--table", args->table,
                  "With --format csv: the Kaplan-Meier table (km) or a long summary table")
      ->check(CLI::IsMember({"km", "summary"}))
      ->capture_default_str();
  sub->add_option("--conf-type", args->confType, "Pointwise interval transform")
      ->check(CLI::IsMember({"log", "log-log", "plain"}))
      ->capture_default_str();
  sub->add_option("--conf-level", args->confLevel, "Confidence level")
      ->check(CLI::Range(0.5, 0.999999))
      ->capture_default_str();
  sub->add_option("--horizon", args->horizon,
                  "Restricted-mean horizon in divisions (default: longest follow-up of any group)")
      ->check(CLI::NonNegativeNumber);
  sub->callback([&action, args] { action = [args] { return runStats(*args); }; });
}

}  // namespace budledger::cli
