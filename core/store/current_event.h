#pragma once
// CurrentEvent: one event as it stands after replaying the journal over the
// engine's proposals — what every view, export and lifespan is computed from.
// Invariants: a proposal-origin event has id == originProposal (> 0) and a
// proposedFrame; an added event has a negative id (minus the seq of the
// journal entry that added it), no origin and no proposedFrame. Status
// `rejected` events stay in the state (the audit trail shows them) but count
// for nothing.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "core/base/events.h"

namespace budledger::store {

enum class EventStatus : std::uint8_t { Proposed, Accepted, Moved, Added, Rejected };
std::string_view toString(EventStatus status);  // "proposed", "accepted", …
std::optional<EventStatus> eventStatusFromString(std::string_view text);

struct CurrentEvent {
  Event event;  // current frame; confidence 1 for added events
  EventStatus status = EventStatus::Proposed;
  std::optional<std::int64_t> originProposal;
  std::optional<int> proposedFrame;
  std::int64_t lastSeq = 0;  // journal entry that last set it (the engine-run entry at first)

  bool counts() const { return status != EventStatus::Rejected; }
  bool fromProposal() const { return originProposal.has_value(); }
  // Field by field (Event itself has no comparison); confidence compared exactly.
  bool operator==(const CurrentEvent& o) const;
};

// The part of an event a journal entry records as "value before/after".
struct EventState {
  int position = 0;
  int trap = 0;
  int frame = 0;
  EventKind kind = EventKind::Bud;
  EventStatus status = EventStatus::Proposed;
  bool operator==(const EventState&) const = default;
};

EventState stateOf(const CurrentEvent& e);
// {"frame":52,"kind":"bud","position":1,"status":"moved","trap":4} (keys sorted);
// "null" stands for "no such event".
std::string stateJson(const std::optional<EventState>& state);
// Throws StoreError on malformed text; nullopt for "null".
std::optional<EventState> parseEventState(std::string_view json);

}  // namespace budledger::store
