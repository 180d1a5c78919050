// stats_reference_driver OUTDIR [DATASETS] [SEED] — draws random censored
// lifespan data sets with ties (integer lifespans 0–60, 0–60% censoring, 1–4
// groups, 1–3 strata; two larger ones at the end) from a fixed seed, runs BudLedger's statistics on
// them and writes OUTDIR/data.csv (the data) and OUTDIR/budledger.csv (every number, one per row,
// keyed so that compare_survival.R can compute the same key from R survival and compare). Undefined
// values are written as NA.
#include <fmt/format.h>

#include <array>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>
#include <vector>

#include "core/stats/stats.h"

namespace {

using namespace budledger::stats;

// std::mt19937_64's output is fixed by the standard; the distributions of
// <random> are not, so the draws below are written out.
class Draw {
 public:
  explicit Draw(std::uint64_t seed) : rng_(seed) {}
  double uniform() { return double(rng_() >> 11) * 0x1.0p-53; }  // [0, 1)
  int integer(int lo, int hi) { return lo + int(uniform() * double(hi - lo + 1)); }

 private:
  std::mt19937_64 rng_;
};

std::vector<Lifespan> drawDataset(Draw& d, int minSize, int maxSize) {
  const int groups = d.integer(1, 4);
  const int strata = d.integer(1, 3);
  const double censoring = 0.6 * d.uniform();
  std::vector<Lifespan> out;
  for (int g = 0; g < groups; ++g) {
    const int n = d.integer(minSize, maxSize);
    const double scale = 8.0 + 27.0 * d.uniform();
    const double shape = 0.8 + 2.2 * d.uniform();
    for (int i = 0; i < n; ++i) {
      // Discretised Weibull lifespans, capped at 60: many ties, some zeros.
      double u = 1.0 - d.uniform();
      int t = int(std::floor(scale * std::pow(-std::log(u), 1.0 / shape)));
      t = std::min(t, 60);
      bool event = true;
      if (d.uniform() < censoring) {
        event = false;
        t = d.integer(0, t);  // lost before death, often at a tied time
      }
      out.push_back(
          {t, event, fmt::format("g{}", g + 1), fmt::format("s{}", d.integer(1, strata))});
    }
  }
  return out;
}

class Sink {
 public:
  Sink(std::ofstream& out, int dataset) : out_(out), dataset_(dataset) {}
  void put(const std::string& key, double v) {
    if (std::isfinite(v)) {
      out_ << fmt::format("{},{},{:.17g}\n", dataset_, key, v);
    } else {
      out_ << fmt::format("{},{},NA\n", dataset_, key);
    }
  }
  void put(const std::string& key, const std::optional<double>& v) {
    put(key, v ? *v : std::nan(""));
  }

 private:
  std::ofstream& out_;
  int dataset_;
};

void curves(Sink& s, const Cohort& c) {
  const KaplanMeierOptions logOpt{0.95, ConfidenceTransform::Log};
  const KaplanMeierOptions llOpt{0.95, ConfidenceTransform::LogLog};
  const auto logCurves = kaplanMeierByGroup(c, logOpt);
  const auto llCurves = kaplanMeierByGroup(c, llOpt);
  const double tau = commonHorizon(logCurves);
  const double probs[] = {0.25, 0.5, 0.75};
  for (std::size_t g = 0; g < logCurves.size(); ++g) {
    const auto& lc = logCurves[g];
    const auto& ll = llCurves[g];
    const std::string& label = lc.group;
    for (std::size_t i = 0; i < lc.steps.size(); ++i) {
      const auto& st = lc.steps[i];
      const std::string k = fmt::format("km/{}/{}", label, st.time);
      s.put(k + "/n.risk", double(st.nRisk));
      s.put(k + "/n.event", double(st.nEvent));
      s.put(k + "/n.censor", double(st.nCensor));
      s.put(k + "/surv", st.survival);
      s.put(k + "/std.err", st.stdErr);
      s.put(k + "/log.lower", st.lower);
      s.put(k + "/log.upper", st.upper);
      s.put(k + "/loglog.lower", ll.steps[i].lower);
      s.put(k + "/loglog.upper", ll.steps[i].upper);
    }
    for (const SurvivalCurve* curve : {&lc, &ll}) {
      const std::string type = curve == &lc ? "log" : "loglog";
      for (const auto& q : quantiles(*curve, probs)) {
        const std::string k = fmt::format("quantile/{}/{}/{}", type, label, q.probability);
        s.put(k + "/est", q.time);
        s.put(k + "/lower", q.lower);
        s.put(k + "/upper", q.upper);
      }
    }
    const auto rm = restrictedMean(lc, tau);
    s.put(fmt::format("rmean/{}/mean", label), rm.mean);
    s.put(fmt::format("rmean/{}/se", label), rm.stdErr);
  }
}

void comparisons(Sink& s, const Cohort& stratified) {
  // The unstratified cohort: the same lifespans with one stratum.
  Cohort pooled;
  for (std::size_t g = 0; g < stratified.groups().size(); ++g) {
    for (const auto& c : stratified.groupTally(g)) {
      for (long i = 0; i < c.events; ++i) pooled.add({c.time, true, stratified.groups()[g], {}});
      for (long i = 0; i < c.censored; ++i) pooled.add({c.time, false, stratified.groups()[g], {}});
    }
  }
  if (stratified.groups().size() < 2) return;
  for (const Cohort* c : std::array<const Cohort*, 2>{&pooled, &stratified}) {
    const std::string strat = c == &pooled ? "none" : "strata";
    for (double rho : {0.0, 1.0}) {
      const auto r = logRank(*c, {rho});
      const std::string k = fmt::format("logrank/{}/rho{}", strat, rho);
      s.put(k + "/defined", r.defined ? 1.0 : 0.0);
      for (std::size_t g = 0; g < r.groups.size(); ++g) {
        s.put(fmt::format("{}/obs/{}", k, r.groups[g]), r.observed[g]);
        s.put(fmt::format("{}/exp/{}", k, r.groups[g]), r.expected[g]);
        for (std::size_t h = 0; h < r.groups.size(); ++h) {
          s.put(fmt::format("{}/var/{}/{}", k, r.groups[g], r.groups[h]),
                r.variance[g * r.groups.size() + h]);
        }
      }
      if (r.defined) {
        s.put(k + "/chisq", r.chiSquare);
        s.put(k + "/df", double(r.df));
        s.put(k + "/p", r.pValue);
      }
    }
    const auto cox = coxByGroup(*c);
    const std::string k = fmt::format("cox/{}", strat);
    s.put(k + "/estimable", cox.fit.estimable ? 1.0 : 0.0);
    if (cox.fit.estimable) {
      for (const auto& hr : cox.ratios) {
        s.put(fmt::format("{}/coef/{}", k, hr.group), hr.coef);
        s.put(fmt::format("{}/se/{}", k, hr.group), hr.stdErr);
      }
      s.put(k + "/loglik0", cox.fit.logLikNull);
      s.put(k + "/loglik", cox.fit.logLik);
      s.put(k + "/score", cox.fit.score);
      s.put(k + "/wald", cox.fit.wald);
    }
  }
}

void fits(Sink& s, const Cohort& c) {
  for (std::size_t g = 0; g < c.groups().size(); ++g) {
    const Tally t = c.groupTally(g);
    const std::string& label = c.groups()[g];
    const auto w = fitWeibull(t);
    s.put(fmt::format("weibull/{}/estimable", label), w.estimable ? 1.0 : 0.0);
    if (w.estimable) {
      s.put(fmt::format("weibull/{}/intercept", label), w.logScale);
      s.put(fmt::format("weibull/{}/logscale", label), w.logSigma);
      s.put(fmt::format("weibull/{}/var.intercept", label), w.logScaleStdErr * w.logScaleStdErr);
      s.put(fmt::format("weibull/{}/var.logscale", label), w.logSigmaStdErr * w.logSigmaStdErr);
      s.put(fmt::format("weibull/{}/cov", label), w.covLogScaleLogSigma);
      s.put(fmt::format("weibull/{}/loglik", label), w.logLik);
    }
    const auto gz = fitGompertz(t);
    s.put(fmt::format("gompertz/{}/estimable", label), gz.estimable ? 1.0 : 0.0);
    if (gz.estimable) {
      s.put(fmt::format("gompertz/{}/a", label), gz.rate);
      s.put(fmt::format("gompertz/{}/b", label), gz.initialMortality);
      s.put(fmt::format("gompertz/{}/se.a", label), gz.rateStdErr);
      s.put(fmt::format("gompertz/{}/se.b", label), gz.initialMortalityStdErr);
      s.put(fmt::format("gompertz/{}/loglik", label), gz.logLik);
    }
  }
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: stats_reference_driver OUTDIR [DATASETS] [SEED]\n");
    return 2;
  }
  const std::filesystem::path dir = argv[1];
  const int count = argc > 2 ? std::stoi(argv[2]) : 200;
  const std::uint64_t seed = argc > 3 ? std::stoull(argv[3]) : 20261201u;
  std::filesystem::create_directories(dir);
  std::ofstream data(dir / "data.csv"), ours(dir / "budledger.csv");
  data << "dataset,time,status,group,stratum\n";
  ours << "dataset,key,value\n";
  Draw draw(seed);
  // The last two data sets are large (up to 2,000 mothers a group), so that tie
  // blocks hold hundreds of deaths.
  for (int i = 1; i <= count + 2; ++i) {
    const auto lifespans = i <= count ? drawDataset(draw, 5, 60) : drawDataset(draw, 500, 2000);
    for (const auto& l : lifespans) {
      data << fmt::format("{},{},{},{},{}\n", i, l.divisions, l.event ? 1 : 0, l.group, l.stratum);
    }
    Cohort cohort(lifespans);
    Sink sink(ours, i);
    curves(sink, cohort);
    comparisons(sink, cohort);
    fits(sink, cohort);
  }
  return (data && ours) ? 0 : 1;
}
