#pragma once
// ReviewEvent: one event as the workstation shows it — the event itself, the
// human decision on it, and where the engine first put it. Views draw from
// these; they are rebuilt from the project (proposals + journal), never kept
// as the only copy of anything.
#include <QString>
#include <cstdint>
#include <functional>
#include <optional>

#include "core/base/events.h"

namespace budledger::ui {

enum class Decision : std::uint8_t {
  Proposed,  // engine call nobody has decided on yet
  Accepted,  // confirmed as proposed
  Moved,     // confirmed at another frame
  Added,     // put in by a person
  Rejected,  // deleted by a person (kept visible, struck through)
};

inline constexpr Decision kAllDecisions[] = {Decision::Proposed, Decision::Accepted,
                                             Decision::Moved, Decision::Added, Decision::Rejected};

struct ReviewEvent {
  Event event;
  Decision decision = Decision::Proposed;
  std::optional<int> proposedFrame;  // the engine's frame when moved

  bool counts() const { return decision != Decision::Rejected; }
};

// Identifies a trap across positions.
struct TrapId {
  int position = 0;
  int trap = 0;
  friend bool operator==(const TrapId&, const TrapId&) = default;
  friend auto operator<=>(const TrapId&, const TrapId&) = default;
};

QString kindName(EventKind kind);  // translated, lower case: "bud"
QString decisionName(Decision d);  // translated, lower case: "accepted"

}  // namespace budledger::ui

template <>
struct std::hash<budledger::ui::TrapId> {
  size_t operator()(const budledger::ui::TrapId& t) const noexcept {
    return std::hash<long long>()((static_cast<long long>(t.position) << 32) ^
                                  static_cast<unsigned>(t.trap));
  }
};
