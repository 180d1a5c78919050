#pragma once
// Truth: the events and tenures an ideal observer of the rendered frames would
// record, read off the trap lives with the conventions of core/lineage: a
// mother present at frame 0 has no arrival; an event's frame is the first
// frame at which it is visible; a washout's frame is the first frame without
// the mother; a death's frame is the frame at which budding stops in the
// model; divisions = separations inside the tenure; tenures alive at the end
// are censored at the last frame. A mother present at frame 0 who shows no
// event during the whole movie leaves no trace in the events, so she gets no
// tenure (and no mother id), exactly as lineage::tenuresFromEvents would.
#include <filesystem>
#include <string>
#include <vector>

#include "core/base/events.h"
#include "demo/biology.h"
#include "demo/device.h"

namespace budledger::demo {

struct TruthEvent {
  int trap = 0;
  int mother = 0;
  int frame = 0;
  EventKind kind = EventKind::Bud;
};

struct TruthTenure {
  int trap = 0;
  int mother = 0;
  int firstFrame = 0;
  int lastFrame = 0;
  int divisions = 0;
  bool died = false;
};

struct PositionTruth {
  std::vector<TruthEvent> events;
  std::vector<TruthTenure> tenures;
};

void appendTrapTruth(int trap, const TrapLife& life, int frames, double intervalMin,
                     PositionTruth& out);

// Writes traps.csv, events.csv, lifespans.csv and drift.csv into `dir`.
void writeTruth(const std::filesystem::path& dir, const Device& device, const PositionTruth& truth,
                const std::vector<Vec2>& drift);

}  // namespace budledger::demo
