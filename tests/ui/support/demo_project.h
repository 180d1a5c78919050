#pragma once
// A made-up experiment written straight through core/store, for the UI tests,
// the benchmark and the screenshot program: positions of traps whose mothers
// bud and divide every 9–13 frames, some die, some wash out, and a few traps
// are crowded or poorly registered. Deterministic for a given seed. Not a
// simulator: no images, only the records the workstation reads.
#include <QString>
#include <vector>

#include "core/base/events.h"

namespace budledger::testsupport {

struct DemoOptions {
  int positions = 2;
  int rows = 3;
  int cols = 4;
  int frames = 120;
  double intervalMinutes = 10.0;
  unsigned seed = 7;
};

// Writes the project at `path` (must not exist) and returns the events it proposed.
std::vector<Event> writeDemoProject(const QString& path, const DemoOptions& options = {});

}  // namespace budledger::testsupport
