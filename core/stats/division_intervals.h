#pragma once
// Division-interval profile: for each mother, the intervals between
// consecutive separations, aligned two ways and summarised across mothers by
// the median and quartiles —
//  - by age: interval k runs from the k-th to the (k+1)-th separation
//    (k = 1, 2, …), so early intervals of all mothers line up;
//  - before death (mothers that died only): interval j is the j-th last, the
//    one ending at the final separation being j = 1, so the slowing of the
//    last divisions before death lines up.
// The stretch from arrival to the first separation and from the last
// separation to death or loss are not whole intervals and are left out.
// Quartiles are R's default (type 7) sample quantiles (Hyndman & Fan 1996).
#include <string>
#include <vector>

namespace budledger::stats {

struct MotherDivisions {
  std::vector<int> separationFrames;  // ascending
  bool died = false;
  std::string group;
};

struct IntervalSummary {
  int index = 0;     // k (by age) or j (before death)
  long mothers = 0;  // intervals summarised
  double median = 0.0, lowerQuartile = 0.0, upperQuartile = 0.0;
};

struct IntervalProfileOptions {
  double minutesPerFrame = 1.0;  // 1: intervals in frames
};

struct IntervalProfile {
  std::string group;
  std::vector<IntervalSummary> byAge;
  std::vector<IntervalSummary> beforeDeath;
};

// One profile per group label, in label order. Throws InputError when a
// mother's separation frames are not strictly increasing.
std::vector<IntervalProfile> divisionIntervalProfiles(const std::vector<MotherDivisions>& mothers,
                                                      const IntervalProfileOptions& options = {});

// Type-7 sample quantile of `values` (copied and sorted), 0 <= p <= 1.
double sampleQuantile(std::vector<double> values, double p);

}  // namespace budledger::stats
