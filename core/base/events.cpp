#include "core/base/events.h"

#include <array>
#include <utility>

namespace budledger {
namespace {
template <typename E, std::size_t N>
std::optional<E> lookup(const std::array<std::pair<E, std::string_view>, N>& table,
                        std::string_view text) {
  for (const auto& [value, name] : table)
    if (name == text) return value;
  return std::nullopt;
}
template <typename E, std::size_t N>
std::string_view name(const std::array<std::pair<E, std::string_view>, N>& table, E value) {
  for (const auto& [v, n] : table)
    if (v == value) return n;
  return "?";
}

constexpr std::array<std::pair<EventKind, std::string_view>, 5> kKinds{{
    {EventKind::Bud, "bud"},
    {EventKind::Separation, "separation"},
    {EventKind::Death, "death"},
    {EventKind::Washout, "washout"},
    {EventKind::Arrival, "arrival"},
}};
constexpr std::array<std::pair<Occupancy, std::string_view>, 4> kOccupancy{{
    {Occupancy::Empty, "empty"},
    {Occupancy::Single, "single"},
    {Occupancy::Budded, "budded"},
    {Occupancy::Crowded, "crowded"},
}};
constexpr std::array<std::pair<Outcome, std::string_view>, 3> kOutcomes{{
    {Outcome::Death, "death"},
    {Outcome::Washout, "washout"},
    {Outcome::EndOfImaging, "end-of-imaging"},
}};
}  // namespace

std::string_view toString(EventKind kind) { return name(kKinds, kind); }
std::optional<EventKind> eventKindFromString(std::string_view t) { return lookup(kKinds, t); }
std::string_view toString(Occupancy occ) { return name(kOccupancy, occ); }
std::optional<Occupancy> occupancyFromString(std::string_view t) { return lookup(kOccupancy, t); }
std::string_view toString(Outcome o) { return name(kOutcomes, o); }
std::optional<Outcome> outcomeFromString(std::string_view t) { return lookup(kOutcomes, t); }

}  // namespace budledger
