#include "core/stats/division_intervals.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <stdexcept>

#include "core/base/error.h"

namespace budledger::stats {

double sampleQuantile(std::vector<double> values, double p) {
  if (values.empty()) throw std::invalid_argument("sampleQuantile: no values");
  std::sort(values.begin(), values.end());
  const double h = (double(values.size()) - 1.0) * p;
  const std::size_t lo = std::size_t(std::floor(h));
  const std::size_t hi = std::min(lo + 1, values.size() - 1);
  return values[lo] + (h - double(lo)) * (values[hi] - values[lo]);
}

namespace {

std::vector<IntervalSummary> summarise(const std::vector<std::vector<double>>& byIndex) {
  std::vector<IntervalSummary> out;
  for (std::size_t i = 0; i < byIndex.size(); ++i) {
    if (byIndex[i].empty()) continue;
    IntervalSummary s;
    s.index = int(i) + 1;
    s.mothers = long(byIndex[i].size());
    s.median = sampleQuantile(byIndex[i], 0.5);
    s.lowerQuartile = sampleQuantile(byIndex[i], 0.25);
    s.upperQuartile = sampleQuantile(byIndex[i], 0.75);
    out.push_back(s);
  }
  return out;
}

}  // namespace

std::vector<IntervalProfile> divisionIntervalProfiles(const std::vector<MotherDivisions>& mothers,
                                                      const IntervalProfileOptions& options) {
  struct Collect {
    std::vector<std::vector<double>> byAge, beforeDeath;
  };
  std::map<std::string, Collect> groups;
  for (std::size_t m = 0; m < mothers.size(); ++m) {
    const auto& f = mothers[m].separationFrames;
    for (std::size_t i = 1; i < f.size(); ++i) {
      if (f[i] <= f[i - 1]) {
        throw InputError(fmt::format("mother {}: separation frames {} and {} are not increasing", m,
                                     f[i - 1], f[i]));
      }
    }
    Collect& c = groups[mothers[m].group];
    const std::size_t n = f.size() < 2 ? 0 : f.size() - 1;  // whole intervals
    if (c.byAge.size() < n) c.byAge.resize(n);
    if (mothers[m].died && c.beforeDeath.size() < n) c.beforeDeath.resize(n);
    for (std::size_t k = 0; k < n; ++k) {
      const double minutes = double(f[k + 1] - f[k]) * options.minutesPerFrame;
      c.byAge[k].push_back(minutes);
      if (mothers[m].died) c.beforeDeath[n - 1 - k].push_back(minutes);
    }
  }
  std::vector<IntervalProfile> out;
  for (const auto& [label, c] : groups) {
    out.push_back({label, summarise(c.byAge), summarise(c.beforeDeath)});
  }
  return out;
}

}  // namespace budledger::stats
