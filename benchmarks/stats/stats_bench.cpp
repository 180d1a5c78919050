// bench_stats — how long the statistics take at experiment scale.
//  - Kaplan–Meier by group + log-rank from 100,000 lifespans (tally included);
//  - the same plus medians, restricted means, Peto–Peto, Cox and both fits;
//  - after one edit in a 10,000-mother experiment: the incremental path
//    (Cohort::remove/add, then curves, medians and the log-rank test; or
//    everything above) and a full rebuild of the tally from the lifespans.
// Lifespans are drawn as two groups, a wild-type-like one (median ≈ 24
// divisions) and a short-lived one (≈ 17), about 20% censored, in two strata;
// a fixed seed keeps runs comparable.
#include <benchmark/benchmark.h>

#include <cmath>
#include <random>

#include "core/stats/stats.h"

namespace {

using namespace budledger::stats;

std::vector<Lifespan> population(int n, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::vector<Lifespan> out;
  out.reserve(n);
  for (int i = 0; i < n; ++i) {
    const bool mutant = i % 2;
    const double scale = mutant ? 20.0 : 28.0;
    int t = int(scale * std::pow(-std::log(1.0 - u(rng)), 1.0 / 2.5));
    bool event = true;
    if (u(rng) < 0.2) {
      event = false;
      t = int(t * u(rng));
    }
    out.push_back({t, event, mutant ? "sir2" : "wt", i % 3 ? "chip1" : "chip2"});
  }
  return out;
}

void curvesAndTest(const Cohort& c) {
  auto curves = kaplanMeierByGroup(c);
  auto lr = logRank(c);
  benchmark::DoNotOptimize(curves);
  benchmark::DoNotOptimize(lr);
}

void everything(const Cohort& c) {
  auto curves = kaplanMeierByGroup(c);
  const double tau = commonHorizon(curves);
  for (std::size_t g = 0; g < curves.size(); ++g) {
    auto m = median(curves[g]);
    auto r = restrictedMean(curves[g], tau);
    const Tally t = c.groupTally(g);
    auto gz = fitGompertz(t);
    auto w = fitWeibull(t);
    benchmark::DoNotOptimize(m);
    benchmark::DoNotOptimize(r);
    benchmark::DoNotOptimize(gz);
    benchmark::DoNotOptimize(w);
  }
  auto lr = logRank(c);
  auto pp = logRank(c, LogRankOptions::petoPeto());
  auto cox = coxByGroup(c);
  benchmark::DoNotOptimize(lr);
  benchmark::DoNotOptimize(pp);
  benchmark::DoNotOptimize(cox);
}

void BM_KaplanMeierLogRank(benchmark::State& state) {
  const auto data = population(int(state.range(0)), 7);
  for (auto _ : state) {
    Cohort c(data);
    curvesAndTest(c);
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
}
BENCHMARK(BM_KaplanMeierLogRank)->Arg(100000)->Unit(benchmark::kMillisecond);

void BM_AllStatistics(benchmark::State& state) {
  const auto data = population(int(state.range(0)), 7);
  for (auto _ : state) {
    Cohort c(data);
    everything(c);
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
}
BENCHMARK(BM_AllStatistics)->Arg(100000)->Unit(benchmark::kMillisecond);

// One edit: a proofreader moves one mother's death by a division (and the
// next iteration moves it back), then the live views are recomputed.
void liveViews(const Cohort& c) {
  auto curves = kaplanMeierByGroup(c);
  for (const auto& k : curves) benchmark::DoNotOptimize(median(k));
  auto lr = logRank(c);
  benchmark::DoNotOptimize(curves);
  benchmark::DoNotOptimize(lr);
}

void BM_EditIncremental(benchmark::State& state) {
  const auto data = population(int(state.range(0)), 11);
  Cohort c(data);
  const Lifespan a = data[1234];
  Lifespan b = a;
  b.divisions += 1;
  bool flip = false;
  for (auto _ : state) {
    c.remove(flip ? b : a);
    c.add(flip ? a : b);
    flip = !flip;
    liveViews(c);
  }
}
BENCHMARK(BM_EditIncremental)->Arg(10000)->Unit(benchmark::kMicrosecond);

void BM_EditIncrementalEverything(benchmark::State& state) {
  const auto data = population(int(state.range(0)), 11);
  Cohort c(data);
  const Lifespan a = data[1234];
  Lifespan b = a;
  b.divisions += 1;
  bool flip = false;
  for (auto _ : state) {
    c.remove(flip ? b : a);
    c.add(flip ? a : b);
    flip = !flip;
    everything(c);
  }
}
BENCHMARK(BM_EditIncrementalEverything)->Arg(10000)->Unit(benchmark::kMicrosecond);

void BM_EditFullRebuild(benchmark::State& state) {
  auto data = population(int(state.range(0)), 11);
  for (auto _ : state) {
    data[1234].divisions ^= 1;  // the edit
    Cohort c(data);
    liveViews(c);
  }
}
BENCHMARK(BM_EditFullRebuild)->Arg(10000)->Unit(benchmark::kMicrosecond);

}  // namespace

BENCHMARK_MAIN();
