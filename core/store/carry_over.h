#pragma once
// Carry-over of human decisions to a new engine run (re-analysis). A pure
// function of the events that stood before the run and the run's proposals,
// so that the writer and replay compute exactly the same mapping.
//
// A decision is an event a person has acted on: a proposal accepted, moved or
// rejected, or an event they added (not one they added and then deleted).
// Each decision is matched one-to-one to a new proposal of the same position,
// trap and kind whose frame lies within `tolerance` frames of the decided
// frame or of the frame originally proposed; closest pairs first, ties by
// frame then id. A matched decision passes to the new proposal (inherit());
// a decided proposal left unmatched stays in the state as it was and is
// listed for review — never dropped.
#include <cstdint>
#include <utility>
#include <vector>

#include "core/store/current_event.h"

namespace budledger::store {

inline constexpr int kCarryOverTolerance = 2;  // frames (the Journal issue's tolerance)

struct CarryOverResult {
  std::vector<std::pair<std::int64_t, std::int64_t>> carried;  // (old event id, new proposal id)
  std::vector<std::int64_t> unmatched;  // decided proposal-origin events without a match
};

bool isDecision(const CurrentEvent& e);

// `before`: the events of the positions the run covers, as they stood.
CarryOverResult carryOver(const std::vector<CurrentEvent>& before,
                          const std::vector<Event>& proposals, int tolerance = kCarryOverTolerance);

// The new proposal's state under the decision it inherits: rejected stays
// rejected; otherwise the person's frame wins (accepted when the new proposal
// already sits there, moved when not).
CurrentEvent inherit(const CurrentEvent& decided, const Event& proposal, std::int64_t seq);

}  // namespace budledger::store
