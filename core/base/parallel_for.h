#pragma once
// parallelFor: calls fn for every index in [0, n) on up to `threads` threads (0: all
// hardware threads), each thread taking the next index as it finishes one. Indexes are
// handed out in order but finish in any order, so callers keep results per index and
// pool them afterwards in index order; then nothing depends on the number of threads.
// fn may take (index) or (index, worker), worker in [0, threads) for per-thread scratch.
#include <algorithm>
#include <atomic>
#include <cstddef>
#include <thread>
#include <type_traits>
#include <vector>

namespace budledger {

template <typename Fn>
void parallelFor(std::size_t n, int threads, Fn&& fn) {
  auto call = [&fn](std::size_t i, int worker) {
    if constexpr (std::is_invocable_v<Fn&, std::size_t, int>)
      fn(i, worker);
    else
      fn(i);
  };
  int workers = threads > 0 ? threads : static_cast<int>(std::thread::hardware_concurrency());
  workers = std::clamp(workers, 1, static_cast<int>(std::max<std::size_t>(1, n)));
  if (workers == 1) {
    for (std::size_t i = 0; i < n; ++i) call(i, 0);
    return;
  }
  std::atomic<std::size_t> next{0};
  auto run = [&](int worker) {
    for (std::size_t i = next++; i < n; i = next++) call(i, worker);
  };
  std::vector<std::thread> pool;
  for (int w = 1; w < workers; ++w) pool.emplace_back(run, w);
  run(0);
  for (auto& th : pool) th.join();
}

}  // namespace budledger
