#pragma once
// upperMedian: the middle value of a sample (the upper of the two middle ones when the
// count is even), found by a partial sort of the copy it is given; a value-initialised
// T (0) for an empty sample. Robust summaries (typical noise, a mother's usual cycle,
// her size) are taken this way across the engine.
#include <algorithm>
#include <cstddef>
#include <vector>

namespace budledger {

template <typename T>
T upperMedian(std::vector<T> v) {
  if (v.empty()) return T{};
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

}  // namespace budledger
