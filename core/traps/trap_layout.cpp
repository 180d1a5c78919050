#include "core/traps/trap_layout.h"

#include <algorithm>
#include <cmath>
#include <map>

namespace budledger::traps {

void numberTraps(std::vector<Trap>& traps, const std::optional<Lattice>& lattice) {
  if (traps.empty()) return;
  std::vector<int> rowKey(traps.size());
  if (lattice) {
    for (size_t i = 0; i < traps.size(); ++i)
      rowKey[i] = static_cast<int>(std::lround(lattice->indices(traps[i].centre).y));
  } else {
    // Cluster by y: a gap wider than half the median nearest-row spacing starts a new row.
    std::vector<size_t> order(traps.size());
    for (size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::sort(order.begin(), order.end(),
              [&](size_t p, size_t q) { return traps[p].centre.y < traps[q].centre.y; });
    std::vector<double> gaps;
    for (size_t k = 1; k < order.size(); ++k)
      gaps.push_back(traps[order[k]].centre.y - traps[order[k - 1]].centre.y);
    std::vector<double> big;
    for (double g : gaps)
      if (g > 2.0) big.push_back(g);
    double spacing = 1e9;
    if (!big.empty()) {
      std::nth_element(big.begin(), big.begin() + static_cast<long>(big.size() / 2), big.end());
      spacing = big[big.size() / 2];
    }
    int row = 0;
    rowKey[order[0]] = 0;
    for (size_t k = 1; k < order.size(); ++k) {
      if (gaps[k - 1] > 0.5 * spacing) ++row;
      rowKey[order[k]] = row;
    }
  }
  std::vector<size_t> order(traps.size());
  for (size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::sort(order.begin(), order.end(), [&](size_t p, size_t q) {
    if (rowKey[p] != rowKey[q]) return rowKey[p] < rowKey[q];
    return traps[p].centre.x < traps[q].centre.x;
  });
  std::vector<Trap> out;
  std::map<int, int> colInRow;
  std::map<int, int> rowNumber;
  for (size_t k : order) {
    Trap t = traps[k];
    if (!rowNumber.count(rowKey[k])) rowNumber[rowKey[k]] = static_cast<int>(rowNumber.size());
    t.row = rowNumber[rowKey[k]];
    t.col = colInRow[rowKey[k]]++;
    t.id = static_cast<int>(out.size());
    out.push_back(t);
  }
  traps = std::move(out);
}

void flagEdges(TrapLayout& layout, cv::Size frame, cv::Point2d minDrift, cv::Point2d maxDrift) {
  const cv::Rect2d s = layout.support;
  for (auto& t : layout.traps) {
    const double x0 = t.centre.x + s.x + std::min(0.0, minDrift.x);
    const double y0 = t.centre.y + s.y + std::min(0.0, minDrift.y);
    const double x1 = t.centre.x + s.x + s.width + std::max(0.0, maxDrift.x);
    const double y1 = t.centre.y + s.y + s.height + std::max(0.0, maxDrift.y);
    t.edge = x0 < 0 || y0 < 0 || x1 > frame.width || y1 > frame.height;
  }
}

cv::Rect cropBox(const cv::Rect2d& support, const std::optional<Lattice>& lattice) {
  double w = support.width + 8, h = support.height + 8;
  cv::Point2d mid(support.x + support.width / 2, support.y + support.height / 2);
  if (lattice) {
    // One cell across and down: the space a trap's cells can occupy before
    // they reach the next trap.
    w = std::max(w, std::abs(lattice->a.x));
    h = std::max(h, std::abs(lattice->b.y));
  }
  const int iw = static_cast<int>(std::ceil(w)) | 1, ih = static_cast<int>(std::ceil(h)) | 1;
  return {static_cast<int>(std::lround(mid.x)) - iw / 2,
          static_cast<int>(std::lround(mid.y)) - ih / 2, iw, ih};
}

}  // namespace budledger::traps
