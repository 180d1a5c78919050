#include "tests/core/common/simulator_truth.h"

#include <cmath>
#include <fstream>
#include <sstream>
#include <stdexcept>

namespace budledger::testing {
namespace {
std::vector<std::vector<double>> readCsv(const std::filesystem::path& file) {
  std::ifstream in(file);
  if (!in) throw std::runtime_error("cannot read " + file.string());
  std::string line;
  std::getline(in, line);  // header
  std::vector<std::vector<double>> rows;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::stringstream ss(line);
    std::string cell;
    std::vector<double> row;
    while (std::getline(ss, cell, ',')) row.push_back(std::stod(cell));
    rows.push_back(row);
  }
  return rows;
}
}  // namespace

std::vector<TruthTrap> readTruthTraps(const std::filesystem::path& file) {
  std::vector<TruthTrap> out;
  for (const auto& r : readCsv(file))
    out.push_back({static_cast<int>(r.at(0)),
                   static_cast<int>(r.at(1)),
                   static_cast<int>(r.at(2)),
                   {r.at(3), r.at(4)}});
  return out;
}

std::vector<cv::Point2d> readTruthDrift(const std::filesystem::path& file) {
  std::vector<cv::Point2d> out;
  for (const auto& r : readCsv(file)) out.emplace_back(r.at(1), r.at(2));
  return out;
}

LayoutScore scoreLayout(const traps::TrapLayout& layout, const registration::DriftTrack& drift,
                        const std::vector<TruthTrap>& truth,
                        const std::vector<cv::Point2d>& truthDrift, double tolerance,
                        double trusted) {
  LayoutScore s;
  s.truth = static_cast<int>(truth.size());
  s.found = static_cast<int>(layout.traps.size());
  // Greedy one-to-one matching by distance (traps are far apart compared
  // with the tolerance, so greedy equals optimal here).
  struct Pair {
    double d;
    size_t ours, theirs;
  };
  std::vector<Pair> pairs;
  for (size_t i = 0; i < layout.traps.size(); ++i)
    for (size_t j = 0; j < truth.size(); ++j) {
      const double d = cv::norm(layout.traps[i].centre - truth[j].centre);
      if (d <= tolerance) pairs.push_back({d, i, j});
    }
  std::sort(pairs.begin(), pairs.end(), [](const Pair& a, const Pair& b) { return a.d < b.d; });
  std::vector<int> ofOurs(layout.traps.size(), -1), ofTruth(truth.size(), -1);
  for (const auto& p : pairs)
    if (ofOurs[p.ours] < 0 && ofTruth[p.theirs] < 0) {
      ofOurs[p.ours] = static_cast<int>(p.theirs);
      ofTruth[p.theirs] = static_cast<int>(p.ours);
    }
  for (int m : ofOurs) s.matched += m >= 0 ? 1 : 0;
  s.recall = s.truth ? static_cast<double>(s.matched) / s.truth : 0;
  s.precision = s.found ? static_cast<double>(s.matched) / s.found : 0;
  if (s.matched == 0) return s;
  for (size_t i = 0; i < ofOurs.size(); ++i)
    if (ofOurs[i] >= 0)
      s.offset += layout.traps[i].centre - truth[static_cast<size_t>(ofOurs[i])].centre;
  s.offset *= 1.0 / s.matched;
  int lastTruthId = -1;
  for (size_t i = 0; i < ofOurs.size(); ++i) {
    if (ofOurs[i] < 0) continue;
    const auto& t = truth[static_cast<size_t>(ofOurs[i])];
    if (t.id < lastTruthId) s.idsRowMajor = false;
    lastTruthId = t.id;
    const cv::Point2d c = layout.traps[i].centre - s.offset;
    s.maxOffsetSpread = std::max(s.maxOffsetSpread, cv::norm(c - t.centre));
    for (size_t f = 0; f < drift.size() && f < truthDrift.size(); ++f) {
      const cv::Point2d ours = c + cv::Point2d(drift[f].dx, drift[f].dy);
      const cv::Point2d theirs = t.centre + truthDrift[f];
      const double e = cv::norm(ours - theirs);
      s.maxTrackErrorAll = std::max(s.maxTrackErrorAll, e);
      if (drift[f].confidence >= trusted) s.maxTrackError = std::max(s.maxTrackError, e);
    }
  }
  double sum = 0;
  for (size_t f = 0; f < drift.size() && f < truthDrift.size(); ++f) {
    const double e = cv::norm(cv::Point2d(drift[f].dx, drift[f].dy) - truthDrift[f]);
    s.maxDriftError = std::max(s.maxDriftError, e);
    sum += e * e;
  }
  s.rmsDriftError = std::sqrt(sum / std::max<size_t>(1, std::min(drift.size(), truthDrift.size())));
  return s;
}

}  // namespace budledger::testing
