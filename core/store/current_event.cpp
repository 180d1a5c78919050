#include "core/store/current_event.h"

#include <fmt/format.h>

#include <array>
#include <charconv>
#include <nlohmann/json.hpp>

#include "core/store/sqlite.h"

namespace budledger::store {
namespace {
constexpr std::array<std::string_view, 5> kStatus{"proposed", "accepted", "moved", "added",
                                                  "rejected"};
}

std::string_view toString(EventStatus s) { return kStatus[static_cast<std::size_t>(s)]; }

std::optional<EventStatus> eventStatusFromString(std::string_view t) {
  for (std::size_t i = 0; i < kStatus.size(); ++i)
    if (kStatus[i] == t) return static_cast<EventStatus>(i);
  return std::nullopt;
}

bool CurrentEvent::operator==(const CurrentEvent& o) const {
  return event.id == o.event.id && event.position == o.event.position &&
         event.trap == o.event.trap && event.frame == o.event.frame && event.kind == o.event.kind &&
         event.confidence == o.event.confidence && status == o.status &&
         originProposal == o.originProposal && proposedFrame == o.proposedFrame &&
         lastSeq == o.lastSeq;
}

EventState stateOf(const CurrentEvent& e) {
  return {e.event.position, e.event.trap, e.event.frame, e.event.kind, e.status};
}

std::string stateJson(const std::optional<EventState>& s) {
  if (!s) return "null";
  // Written by hand (same text nlohmann's sorted dump gives) because every
  // edit and every replayed entry goes through here.
  return fmt::format(R"({{"frame":{},"kind":"{}","position":{},"status":"{}","trap":{}}})",
                     s->frame, toString(s->kind), s->position, toString(s->status), s->trap);
}

namespace {

// Reads the exact text stateJson() writes, without building a JSON tree:
// replay parses two of these per entry. Returns false for anything else,
// which then goes through the general parser.
bool parseCanonical(std::string_view s, EventState& out) {
  auto literal = [&](std::string_view lit) {
    if (!s.starts_with(lit)) return false;
    s.remove_prefix(lit.size());
    return true;
  };
  auto integer = [&](int& v) {
    const auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc()) return false;
    s.remove_prefix(static_cast<std::size_t>(p - s.data()));
    return true;
  };
  auto word = [&](std::string_view& w) {
    const auto q = s.find('"');
    if (q == std::string_view::npos) return false;
    w = s.substr(0, q);
    s.remove_prefix(q);
    return true;
  };
  std::string_view kind, status;
  if (!(literal(R"({"frame":)") && integer(out.frame) && literal(R"(,"kind":")") && word(kind) &&
        literal(R"(","position":)") && integer(out.position) && literal(R"(,"status":")") &&
        word(status) && literal(R"(","trap":)") && integer(out.trap) && literal("}") && s.empty()))
    return false;
  const auto k = eventKindFromString(kind);
  const auto st = eventStatusFromString(status);
  if (!k || !st) return false;
  out.kind = *k;
  out.status = *st;
  return true;
}

}  // namespace

std::optional<EventState> parseEventState(std::string_view json) {
  if (json == "null") return std::nullopt;
  if (EventState fast; parseCanonical(json, fast)) return fast;
  try {
    const auto j = nlohmann::json::parse(json);
    EventState s;
    s.position = j.at("position").get<int>();
    s.trap = j.at("trap").get<int>();
    s.frame = j.at("frame").get<int>();
    const auto kind = eventKindFromString(j.at("kind").get<std::string>());
    const auto status = eventStatusFromString(j.at("status").get<std::string>());
    if (!kind || !status) throw StoreError("unknown kind or status");
    s.kind = *kind;
    s.status = *status;
    return s;
  } catch (const nlohmann::json::exception& e) {
    throw StoreError(fmt::format("malformed event state '{}': {}", json, e.what()));
  }
}

}  // namespace budledger::store
