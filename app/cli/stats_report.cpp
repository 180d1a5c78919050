#include "app/cli/stats_report.h"

#include <fmt/format.h>

#include <nlohmann/json.hpp>

namespace budledger::cli {

using namespace stats;

StatsReport computeStatsReport(const std::vector<Lifespan>& lifespans,
                               const StatsReportOptions& options) {
  StatsReport r;
  r.options = options;
  const Cohort cohort(lifespans);
  r.lifespans = cohort.size();
  r.strata = cohort.strata();
  const auto curves = kaplanMeierByGroup(cohort, options.km);
  const double horizon = options.horizon.value_or(commonHorizon(curves));
  const double quartileProbs[] = {0.25, 0.75};
  for (std::size_t g = 0; g < curves.size(); ++g) {
    GroupReport gr;
    gr.curve = curves[g];
    r.deaths += gr.curve.events;
    gr.median = median(gr.curve);
    gr.quartiles = quantiles(gr.curve, quartileProbs);
    gr.restricted = restrictedMean(gr.curve, horizon);
    const Tally tally = cohort.groupTally(g);
    gr.gompertz = fitGompertz(tally);
    gr.weibull = fitWeibull(tally);
    r.groups.push_back(std::move(gr));
  }
  r.logRank = logRank(cohort, LogRankOptions::logRank());
  r.petoPeto = logRank(cohort, LogRankOptions::petoPeto());
  CoxOptions cox;
  cox.confidenceLevel = options.km.confidenceLevel;
  r.cox = coxByGroup(cohort, cox);
  return r;
}

namespace {

std::string transformName(ConfidenceTransform t) {
  switch (t) {
    case ConfidenceTransform::Log:
      return "log";
    case ConfidenceTransform::LogLog:
      return "log-log";
    case ConfidenceTransform::Plain:
      return "plain";
  }
  return "log";
}

// Shortest text that reads back as the same double; NA when undefined.
std::string exact(const std::optional<double>& v) { return v ? fmt::format("{}", *v) : "NA"; }
std::string fixed(const std::optional<double>& v, int digits) {
  return v ? fmt::format("{:.{}f}", *v, digits) : "NA";
}
std::string divisions(const std::optional<double>& v) {
  return v ? fmt::format("{:g}", *v) : "not reached";
}
std::string pValue(double p) { return p < 1e-300 ? "< 1e-300" : fmt::format("{:.3g}", p); }
std::string percent(double level) { return fmt::format("{:g}%", level * 100.0); }

std::string interval(const QuantileEstimate& q) {
  return fmt::format("{} ({} to {})", divisions(q.time), divisions(q.lower), divisions(q.upper));
}

std::string csvField(const std::string& s) {
  if (s.find_first_of(",\"\n") == std::string::npos) return s;
  std::string out = "\"";
  for (char c : s) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

void textLogRank(std::string& out, const char* name, const LogRankResult& lr,
                 const StatsReport& r) {
  const std::string strat = r.options.stratumColumn.empty()
                                ? ""
                                : fmt::format(", stratified by '{}'", r.options.stratumColumn);
  if (!lr.defined) {
    out += fmt::format("{}{}: not defined ({})\n", name, strat, lr.problem);
    return;
  }
  out += fmt::format("{}{}: chi-square {:.6f} on {} df, p = {}\n", name, strat, lr.chiSquare, lr.df,
                     pValue(lr.pValue));
}

}  // namespace

std::string renderText(const StatsReport& r) {
  const auto& o = r.options;
  std::string out = fmt::format("Lifespan statistics for {}: {} mothers, {} deaths", o.source,
                                r.lifespans, r.deaths);
  if (!o.groupColumn.empty()) {
    out += fmt::format("; {} group(s) by '{}'", r.groups.size(), o.groupColumn);
  }
  if (!o.stratumColumn.empty()) {
    out += fmt::format("; {} strata by '{}'", r.strata.size(), o.stratumColumn);
  }
  out += "\n\n";

  const std::string pct = percent(o.km.confidenceLevel);
  out += fmt::format("Kaplan-Meier survival over divisions ({} pointwise CI, {} transform)\n", pct,
                     transformName(o.km.transform));
  std::size_t width = 5;
  for (const auto& g : r.groups) width = std::max(width, g.curve.group.size());
  out += fmt::format("{:<{}}  {:>9}  {:>6}  {:>7}  {:>8}  {:>8}  {:>8}  {:>8}  {:>8}\n", "group",
                     width, "divisions", "n_risk", "n_event", "n_censor", "survival", "std_err",
                     "lower", "upper");
  for (const auto& g : r.groups) {
    for (const auto& s : g.curve.steps) {
      out += fmt::format("{:<{}}  {:>9}  {:>6}  {:>7}  {:>8}  {:>8}  {:>8}  {:>8}  {:>8}\n",
                         g.curve.group, width, s.time, s.nRisk, s.nEvent, s.nCensor,
                         fixed(s.survival, 6), fixed(s.stdErr, 6), fixed(s.lower, 6),
                         fixed(s.upper, 6));
    }
  }

  out += fmt::format(
      "\nMedian RLS in divisions ({} CI, Brookmeyer-Crowley); restricted mean to {:g}\n", pct,
      r.groups.empty() ? 0.0 : r.groups.front().restricted.horizon);
  for (const auto& g : r.groups) {
    out += fmt::format(
        "  {:<{}}  n {:>5}  deaths {:>5}  median {}  quartiles {} / {}  restricted mean "
        "{:.4f} (se {:.4f})\n",
        g.curve.group, width, g.curve.n, g.curve.events, interval(g.median),
        divisions(g.quartiles[0].time), divisions(g.quartiles[1].time), g.restricted.mean,
        g.restricted.stdErr);
  }

  out += "\n";
  textLogRank(out, "Log-rank test", r.logRank, r);
  if (r.logRank.defined) {
    for (std::size_t g = 0; g < r.logRank.groups.size(); ++g) {
      out += fmt::format("  {:<{}}  observed deaths {:>6g}  expected {:.4f}\n", r.logRank.groups[g],
                         width, r.logRank.observed[g], r.logRank.expected[g]);
    }
  }
  textLogRank(out, "Peto-Peto test", r.petoPeto, r);
  const std::string coxStrata = r.options.stratumColumn.empty()
                                    ? ""
                                    : fmt::format(", stratified by '{}'", r.options.stratumColumn);
  if (r.cox.fit.estimable) {
    out += fmt::format("Cox proportional hazards (Efron ties{}), reference '{}':\n", coxStrata,
                       r.cox.reference);
    for (const auto& hr : r.cox.ratios) {
      out +=
          fmt::format("  {:<{}}  hazard ratio {:.4f} ({} CI {:.4f} to {:.4f}), p = {}\n", hr.group,
                      width, hr.hazardRatio, pct, hr.lower, hr.upper, pValue(hr.pValue));
    }
  } else {
    out += fmt::format("Cox proportional hazards: not estimable ({})\n", r.cox.fit.problem);
  }

  out += "\nGompertz fits, hazard b*exp(a*n) (standard errors in brackets)\n";
  for (const auto& g : r.groups) {
    const auto& f = g.gompertz;
    if (!f.estimable) {
      out += fmt::format("  {:<{}}  not estimable ({})\n", g.curve.group, width, f.problem);
      continue;
    }
    out += fmt::format(
        "  {:<{}}  a {:.6f} ({:.6f})  b {:.6f} ({:.6f})  doubling time {} divisions  log L "
        "{:.4f}  AIC {:.4f}\n",
        g.curve.group, width, f.rate, f.rateStdErr, f.initialMortality, f.initialMortalityStdErr,
        f.doublingTime ? fmt::format("{:.3f}", *f.doublingTime) : "not defined (a <= 0)", f.logLik,
        f.aic);
  }
  out += "Weibull fits, S(n) = exp(-(n/scale)^shape)\n";
  for (const auto& g : r.groups) {
    const auto& f = g.weibull;
    if (!f.estimable) {
      out += fmt::format("  {:<{}}  not estimable ({})\n", g.curve.group, width, f.problem);
      continue;
    }
    out += fmt::format(
        "  {:<{}}  shape {:.6f} ({:.6f})  scale {:.6f} ({:.6f})  log L {:.4f}  AIC {:.4f}{}\n",
        g.curve.group, width, f.shape, f.shapeStdErr, f.scale, f.scaleStdErr, f.logLik, f.aic,
        f.excludedAtZero > 0
            ? fmt::format("  ({} mothers with 0 divisions left out)", f.excludedAtZero)
            : "");
  }
  return out;
}

std::string renderKaplanMeierCsv(const StatsReport& r) {
  std::string out = "group,divisions,n_risk,n_event,n_censor,survival,std_err,lower,upper\n";
  for (const auto& g : r.groups) {
    for (const auto& s : g.curve.steps) {
      out += fmt::format("{},{},{},{},{},{},{},{},{}\n", csvField(g.curve.group), s.time, s.nRisk,
                         s.nEvent, s.nCensor, exact(s.survival), exact(s.stdErr), exact(s.lower),
                         exact(s.upper));
    }
  }
  return out;
}

std::string renderSummaryCsv(const StatsReport& r) {
  std::string out = "section,group,statistic,value,std_err,lower,upper\n";
  auto row = [&out](const std::string& section, const std::string& group,
                    const std::string& statistic, const std::optional<double>& value,
                    const std::optional<double>& se = std::nullopt,
                    const std::optional<double>& lo = std::nullopt,
                    const std::optional<double>& hi = std::nullopt) {
    out += fmt::format("{},{},{},{},{},{},{}\n", section, csvField(group), statistic, exact(value),
                       exact(se), exact(lo), exact(hi));
  };
  for (const auto& g : r.groups) {
    const std::string& label = g.curve.group;
    row("count", label, "mothers", double(g.curve.n));
    row("count", label, "deaths", double(g.curve.events));
    row("median", label, "divisions", g.median.time, std::nullopt, g.median.lower, g.median.upper);
    for (const auto& q : g.quartiles) {
      row("quantile", label, fmt::format("p{:g}", q.probability * 100), q.time, std::nullopt,
          q.lower, q.upper);
    }
    row("restricted_mean", label, fmt::format("to_{:g}", g.restricted.horizon), g.restricted.mean,
        g.restricted.stdErr);
    if (g.gompertz.estimable) {
      row("gompertz", label, "a", g.gompertz.rate, g.gompertz.rateStdErr);
      row("gompertz", label, "b", g.gompertz.initialMortality, g.gompertz.initialMortalityStdErr);
      row("gompertz", label, "doubling_time", g.gompertz.doublingTime,
          g.gompertz.doublingTimeStdErr);
      row("gompertz", label, "log_likelihood", g.gompertz.logLik);
      row("gompertz", label, "aic", g.gompertz.aic);
    }
    if (g.weibull.estimable) {
      row("weibull", label, "shape", g.weibull.shape, g.weibull.shapeStdErr);
      row("weibull", label, "scale", g.weibull.scale, g.weibull.scaleStdErr);
      row("weibull", label, "log_likelihood", g.weibull.logLik);
      row("weibull", label, "aic", g.weibull.aic);
    }
  }
  for (const auto* lr : {&r.logRank, &r.petoPeto}) {
    const std::string section = lr == &r.logRank ? "log_rank" : "peto_peto";
    if (!lr->defined) continue;
    row(section, "", "chi_square", lr->chiSquare);
    row(section, "", "df", double(lr->df));
    row(section, "", "p", lr->pValue);
    for (std::size_t g = 0; g < lr->groups.size(); ++g) {
      row(section, lr->groups[g], "observed", lr->observed[g]);
      row(section, lr->groups[g], "expected", lr->expected[g]);
    }
  }
  if (r.cox.fit.estimable) {
    for (const auto& hr : r.cox.ratios) {
      row("cox", hr.group, "hazard_ratio", hr.hazardRatio, std::nullopt, hr.lower, hr.upper);
      row("cox", hr.group, "log_hazard_ratio", hr.coef, hr.stdErr);
      row("cox", hr.group, "p", hr.pValue);
    }
  }
  return out;
}

namespace {

// Keys in the order written, so the output reads top-down like the text report.
using json = nlohmann::ordered_json;

json value(const std::optional<double>& v) { return v ? json(*v) : json(nullptr); }

json quantileJson(const QuantileEstimate& q) {
  return {{"probability", q.probability},
          {"estimate", value(q.time)},
          {"lower", value(q.lower)},
          {"upper", value(q.upper)}};
}

json logRankJson(const LogRankResult& lr, double rho) {
  json j = {{"rho", rho},
            {"defined", lr.defined},
            {"groups", lr.groups},
            {"n", lr.n},
            {"observed", lr.observed},
            {"expected", lr.expected},
            {"variance", lr.variance},
            {"strata", lr.strata}};
  if (lr.defined) {
    j["chi_square"] = lr.chiSquare;
    j["df"] = lr.df;
    j["p"] = lr.pValue;
  } else {
    j["problem"] = lr.problem;
  }
  return j;
}

}  // namespace

std::string renderJson(const StatsReport& r) {
  json j;
  j["input"] = {
      {"file", r.options.source},
      {"mothers", r.lifespans},
      {"deaths", r.deaths},
      {"group_by", r.options.groupColumn.empty() ? json(nullptr) : json(r.options.groupColumn)},
      {"strata_by",
       r.options.stratumColumn.empty() ? json(nullptr) : json(r.options.stratumColumn)},
      {"strata", r.strata}};
  j["confidence"] = {{"level", r.options.km.confidenceLevel},
                     {"transform", transformName(r.options.km.transform)}};
  j["groups"] = json::array();
  for (const auto& g : r.groups) {
    json km = json::array();
    for (const auto& s : g.curve.steps) {
      km.push_back({{"divisions", s.time},
                    {"n_risk", s.nRisk},
                    {"n_event", s.nEvent},
                    {"n_censor", s.nCensor},
                    {"survival", s.survival},
                    {"std_err", value(s.stdErr)},
                    {"lower", value(s.lower)},
                    {"upper", value(s.upper)}});
    }
    json gj = {{"group", g.curve.group},
               {"mothers", g.curve.n},
               {"deaths", g.curve.events},
               {"kaplan_meier", km},
               {"median", quantileJson(g.median)},
               {"quartiles", {quantileJson(g.quartiles[0]), quantileJson(g.quartiles[1])}},
               {"restricted_mean",
                {{"horizon", g.restricted.horizon},
                 {"mean", g.restricted.mean},
                 {"std_err", g.restricted.stdErr}}}};
    const auto& gz = g.gompertz;
    gj["gompertz"] = gz.estimable ? json{{"estimable", true},
                                         {"a", gz.rate},
                                         {"a_std_err", gz.rateStdErr},
                                         {"b", gz.initialMortality},
                                         {"b_std_err", gz.initialMortalityStdErr},
                                         {"cov_a_b", gz.covRateInitial},
                                         {"doubling_time", value(gz.doublingTime)},
                                         {"doubling_time_std_err", value(gz.doublingTimeStdErr)},
                                         {"log_likelihood", gz.logLik},
                                         {"aic", gz.aic}}
                                  : json{{"estimable", false}, {"problem", gz.problem}};
    const auto& w = g.weibull;
    gj["weibull"] = w.estimable ? json{{"estimable", true},
                                       {"shape", w.shape},
                                       {"shape_std_err", w.shapeStdErr},
                                       {"scale", w.scale},
                                       {"scale_std_err", w.scaleStdErr},
                                       {"log_scale", w.logScale},
                                       {"log_sigma", w.logSigma},
                                       {"cov_log_scale_log_sigma", w.covLogScaleLogSigma},
                                       {"log_likelihood", w.logLik},
                                       {"aic", w.aic},
                                       {"mothers_used", w.n},
                                       {"left_out_at_zero", w.excludedAtZero}}
                                : json{{"estimable", false}, {"problem", w.problem}};
    j["groups"].push_back(gj);
  }
  j["log_rank"] = logRankJson(r.logRank, 0.0);
  j["peto_peto"] = logRankJson(r.petoPeto, 1.0);
  json cox = {
      {"ties", "efron"}, {"reference", r.cox.reference}, {"estimable", r.cox.fit.estimable}};
  if (r.cox.fit.estimable) {
    cox["hazard_ratios"] = json::array();
    for (const auto& hr : r.cox.ratios) {
      cox["hazard_ratios"].push_back({{"group", hr.group},
                                      {"coef", hr.coef},
                                      {"std_err", hr.stdErr},
                                      {"hazard_ratio", hr.hazardRatio},
                                      {"lower", hr.lower},
                                      {"upper", hr.upper},
                                      {"p", hr.pValue}});
    }
    cox["log_likelihood"] = r.cox.fit.logLik;
    cox["log_likelihood_null"] = r.cox.fit.logLikNull;
    cox["likelihood_ratio"] = r.cox.fit.likelihoodRatio;
    cox["likelihood_ratio_p"] = r.cox.fit.likelihoodRatioP;
    cox["score"] = r.cox.fit.score;
    cox["score_p"] = r.cox.fit.scoreP;
    cox["wald"] = r.cox.fit.wald;
    cox["wald_p"] = r.cox.fit.waldP;
  } else {
    cox["problem"] = r.cox.fit.problem;
  }
  j["cox"] = cox;
  return j.dump(2) + "\n";
}

}  // namespace budledger::cli
