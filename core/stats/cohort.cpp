#include "core/stats/cohort.h"

#include <fmt/format.h>

#include <algorithm>
#include <stdexcept>

#include "core/base/error.h"

namespace budledger::stats {

void checkLifespan(const Lifespan& l) {
  if (l.divisions < 0) {
    throw InputError(
        fmt::format("lifespan with {} divisions: divisions cannot be negative", l.divisions));
  }
}

Tally mergeTallies(const Tally& a, const Tally& b) {
  Tally out;
  out.reserve(a.size() + b.size());
  std::size_t i = 0, j = 0;
  while (i < a.size() || j < b.size()) {
    if (j == b.size() || (i < a.size() && a[i].time < b[j].time)) {
      out.push_back(a[i++]);
    } else if (i == a.size() || b[j].time < a[i].time) {
      out.push_back(b[j++]);
    } else {
      out.push_back({a[i].time, a[i].events + b[j].events, a[i].censored + b[j].censored});
      ++i;
      ++j;
    }
  }
  return out;
}

long tallySize(const Tally& t) {
  long n = 0;
  for (const auto& c : t) n += c.total();
  return n;
}

long tallyEvents(const Tally& t) {
  long n = 0;
  for (const auto& c : t) n += c.events;
  return n;
}

namespace {

Tally::iterator findTime(Tally& t, int time) {
  return std::lower_bound(t.begin(), t.end(), time,
                          [](const TimeCount& c, int v) { return c.time < v; });
}

}  // namespace

Cohort::Cohort(std::span<const Lifespan> lifespans) {
  for (const auto& l : lifespans) add(l);
}

std::size_t Cohort::groupIndex(const std::string& label) const {
  auto it = std::lower_bound(groups_.begin(), groups_.end(), label);
  return (it != groups_.end() && *it == label) ? std::size_t(it - groups_.begin()) : groups_.size();
}

std::size_t Cohort::stratumIndex(const std::string& label) const {
  auto it = std::lower_bound(strata_.begin(), strata_.end(), label);
  return (it != strata_.end() && *it == label) ? std::size_t(it - strata_.begin()) : strata_.size();
}

std::size_t Cohort::findOrInsertGroup(const std::string& label) {
  if (lastGroup_ < groups_.size() && groups_[lastGroup_] == label) return lastGroup_;
  auto it = std::lower_bound(groups_.begin(), groups_.end(), label);
  std::size_t g = std::size_t(it - groups_.begin());
  if (it == groups_.end() || *it != label) {
    groups_.insert(it, label);
    cells_.insert(cells_.begin() + long(g), std::vector<Tally>(strata_.size()));
  }
  return lastGroup_ = g;
}

std::size_t Cohort::findOrInsertStratum(const std::string& label) {
  if (lastStratum_ < strata_.size() && strata_[lastStratum_] == label) return lastStratum_;
  auto it = std::lower_bound(strata_.begin(), strata_.end(), label);
  std::size_t s = std::size_t(it - strata_.begin());
  if (it == strata_.end() || *it != label) {
    strata_.insert(it, label);
    for (auto& row : cells_) row.insert(row.begin() + long(s), Tally{});
  }
  return lastStratum_ = s;
}

void Cohort::add(const Lifespan& l) {
  checkLifespan(l);
  // Stratum first: inserting a stratum touches every group row, inserting a group one row.
  std::size_t s = findOrInsertStratum(l.stratum);
  std::size_t g = findOrInsertGroup(l.group);
  Tally& t = cells_[g][s];
  auto it = findTime(t, l.divisions);
  if (it == t.end() || it->time != l.divisions) it = t.insert(it, TimeCount{l.divisions, 0, 0});
  (l.event ? it->events : it->censored) += 1;
  ++size_;
}

void Cohort::remove(const Lifespan& l) {
  std::size_t g = groupIndex(l.group);
  std::size_t s = stratumIndex(l.stratum);
  if (g == groups_.size() || s == strata_.size()) {
    throw std::invalid_argument("Cohort::remove: no such group or stratum");
  }
  Tally& t = cells_[g][s];
  auto it = findTime(t, l.divisions);
  long* count = nullptr;
  if (it != t.end() && it->time == l.divisions) count = l.event ? &it->events : &it->censored;
  if (!count || *count == 0) throw std::invalid_argument("Cohort::remove: no such lifespan");
  --*count;
  if (it->total() == 0) t.erase(it);
  --size_;
  dropEmptyLabels(g, s);
}

void Cohort::dropEmptyLabels(std::size_t g, std::size_t s) {
  bool groupEmpty =
      std::all_of(cells_[g].begin(), cells_[g].end(), [](const Tally& t) { return t.empty(); });
  if (groupEmpty) {
    groups_.erase(groups_.begin() + long(g));
    cells_.erase(cells_.begin() + long(g));
  }
  bool stratumEmpty = std::all_of(cells_.begin(), cells_.end(),
                                  [s](const std::vector<Tally>& row) { return row[s].empty(); });
  if (stratumEmpty) {
    strata_.erase(strata_.begin() + long(s));
    for (auto& row : cells_) row.erase(row.begin() + long(s));
  }
  lastGroup_ = lastStratum_ = 0;
}

const Tally& Cohort::cell(std::size_t group, std::size_t stratum) const {
  return cells_.at(group).at(stratum);
}

Tally Cohort::groupTally(std::size_t group) const {
  const auto& row = cells_.at(group);
  if (row.size() == 1) return row[0];
  Tally out;
  for (const auto& t : row) out = mergeTallies(out, t);
  return out;
}

Tally Cohort::stratumTally(std::size_t stratum) const {
  Tally out;
  for (const auto& row : cells_) out = mergeTallies(out, row.at(stratum));
  return out;
}

}  // namespace budledger::stats
