#pragma once
// The event vocabulary shared by the engine, the journal, lineage and the UI.
// An Event is one call about one trap at one frame: a bud emerges, a daughter
// separates, the mother dies, is washed out, or a new mother arrives. `frame`
// is the first frame at which the event is visible.
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace budledger {

enum class EventKind : std::uint8_t { Bud, Separation, Death, Washout, Arrival };

inline constexpr EventKind kAllEventKinds[] = {EventKind::Bud, EventKind::Separation,
                                               EventKind::Death, EventKind::Washout,
                                               EventKind::Arrival};

// "bud", "separation", "death", "washout", "arrival" (the CSV and journal form).
std::string_view toString(EventKind kind);
std::optional<EventKind> eventKindFromString(std::string_view text);

// Per-frame occupancy of a trap (design.md, "The job, in the trade's terms").
enum class Occupancy : std::uint8_t { Empty, Single, Budded, Crowded };
std::string_view toString(Occupancy occ);
std::optional<Occupancy> occupancyFromString(std::string_view text);

// How a tenure ended. Washout and end of imaging are right-censored.
enum class Outcome : std::uint8_t { Death, Washout, EndOfImaging };
std::string_view toString(Outcome outcome);  // "death", "washout", "end-of-imaging"
std::optional<Outcome> outcomeFromString(std::string_view text);
inline bool isCensored(Outcome o) { return o != Outcome::Death; }

struct Event {
  std::int64_t id = 0;  // stable id (proposal id or journal-added id); 0 = none
  int position = 0;     // position (field of view) id within the experiment
  int trap = 0;         // trap id within its position
  int frame = 0;
  EventKind kind = EventKind::Bud;
  double confidence = 1.0;  // engine posterior in [0,1]; 1 for human-added events
};

}  // namespace budledger
