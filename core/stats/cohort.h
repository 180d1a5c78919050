#pragma once
// Cohort: lifespans tallied by group and stratum — the sufficient statistic that
// every method in budledger::stats reads, since all of them depend on the data
// only through the counts of deaths and censorings at each distinct time.
//
// Invariants: group and stratum labels are sorted, unique, and each has at least
// one lifespan; every cell's Tally lists distinct times in ascending order and
// holds no entry whose counts are both zero. add() and remove() keep this in
// O(labels + distinct times), so a live view can follow one edit without
// re-reading every mother.
#include <cstddef>
#include <span>
#include <string>
#include <vector>

#include "core/stats/lifespan.h"

namespace budledger::stats {

struct TimeCount {
  int time = 0;
  long events = 0;
  long censored = 0;
  long total() const { return events + censored; }
};

// Distinct times in ascending order with their counts.
using Tally = std::vector<TimeCount>;

Tally mergeTallies(const Tally& a, const Tally& b);
long tallySize(const Tally& t);    // number of lifespans
long tallyEvents(const Tally& t);  // number of deaths

class Cohort {
 public:
  Cohort() = default;
  explicit Cohort(std::span<const Lifespan> lifespans);

  void add(const Lifespan& l);
  // Removes one lifespan equal to `l`; throws std::invalid_argument if there is none.
  void remove(const Lifespan& l);

  const std::vector<std::string>& groups() const { return groups_; }
  const std::vector<std::string>& strata() const { return strata_; }
  // Index of a label, or groups().size() / strata().size() when absent.
  std::size_t groupIndex(const std::string& label) const;
  std::size_t stratumIndex(const std::string& label) const;

  const Tally& cell(std::size_t group, std::size_t stratum) const;
  Tally groupTally(std::size_t group) const;      // pooled over strata
  Tally stratumTally(std::size_t stratum) const;  // pooled over groups
  long size() const { return size_; }
  bool empty() const { return size_ == 0; }

 private:
  std::size_t findOrInsertGroup(const std::string& label);
  std::size_t findOrInsertStratum(const std::string& label);
  void dropEmptyLabels(std::size_t group, std::size_t stratum);

  std::vector<std::string> groups_;
  std::vector<std::string> strata_;
  std::vector<std::vector<Tally>> cells_;  // [group][stratum]
  long size_ = 0;
  // Records usually arrive grouped; remembering the last label spares a search.
  std::size_t lastGroup_ = 0;
  std::size_t lastStratum_ = 0;
};

}  // namespace budledger::stats
