#pragma once
// Progress reporting and cancellation for long work (ingest, analysis, export).
// Core never prints or blocks on a UI: it calls a Progress sink, which the CLI
// turns into a terminal bar and the workstation into a progress dialog, and it
// polls a CancelToken between units of work.
#include <atomic>
#include <functional>
#include <string_view>

#include "core/base/error.h"

namespace budledger {

class CancelToken {
 public:
  void cancel() { cancelled_.store(true, std::memory_order_relaxed); }
  bool cancelled() const { return cancelled_.load(std::memory_order_relaxed); }
  void throwIfCancelled() const {
    if (cancelled()) throw Cancelled();
  }

 private:
  std::atomic<bool> cancelled_{false};
};

// fraction in [0, 1] for the named stage; called from the working thread.
using ProgressFn = std::function<void(std::string_view stage, double fraction)>;

struct Progress {
  ProgressFn report;
  const CancelToken* cancel = nullptr;

  void operator()(std::string_view stage, double fraction) const {
    if (report) report(stage, fraction);
    if (cancel) cancel->throwIfCancelled();
  }
};

}  // namespace budledger
