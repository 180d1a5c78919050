#pragma once
// budledger::lineage — tenures and lifespans from events: one pure function,
// shared by the UI, the CLI, exports and reports, so every view counts a
// mother's divisions the same way.
//
// Rules (docs/methods.md, "Tenures"):
//  - A trap's events are taken in frame order (ties: arrival, bud, separation,
//    death, washout).
//  - A tenure opens at an arrival, or implicitly at frame 0 when the trap's
//    first call is about a mother already there (bud, separation, death,
//    washout before any arrival).
//  - It closes at death (outcome death; last frame = the death frame), washout
//    (censored; a washout's frame is the first frame without the mother, so
//    the last frame is the one before) or, with neither, at the last frame of
//    the movie (censored, end of imaging). An arrival while a tenure is
//    open closes the old tenure one frame earlier as a washout: a new mother
//    can only take the cup when the old one has gone.
//  - Death is absorbing: later buds or separations in the same tenure are
//    ignored (and reported in `ignored`), not counted.
//  - divisions = separations inside the tenure (RLS = completed divisions).
#include <cstdint>
#include <optional>
#include <vector>

#include "core/base/events.h"

namespace budledger::lineage {

struct Tenure {
  int position = 0;
  int trap = 0;
  int mother = 0;  // 0, 1, 2 … in order of arrival within the trap
  int firstFrame = 0;
  int lastFrame = 0;  // inclusive
  int divisions = 0;
  Outcome outcome = Outcome::EndOfImaging;
  std::vector<int> separationFrames;
  std::vector<int> budFrames;
};

struct LineageResult {
  std::vector<Tenure> tenures;
  std::vector<std::int64_t> ignored;  // ids of events that fell outside any tenure rule
};

// `events` may hold several positions and traps in any order; `frameCount` is the number of
// frames in the movie (the last frame is frameCount - 1).
LineageResult tenuresFromEvents(std::vector<Event> events, int frameCount);

}  // namespace budledger::lineage
