#pragma once
// TrapRef and Scope: which trap an edit touches and what a sign-off covers.
// A Scope names the whole experiment, one position or one trap, by position
// id. Its *named* text uses position names instead of ids; that is what a
// sign-off digest binds, so the digest survives a merge that renumbers
// positions. Invariant: a Trap scope always has a position; an Experiment
// scope ignores position and trap (both 0).
#include <compare>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace budledger::store {

struct TrapRef {
  int position = 0;
  int trap = 0;
  auto operator<=>(const TrapRef&) const = default;
};

// One mother's tenure in a trap: mother = 0, 1, 2 … in order of arrival
// (lineage::Tenure::mother).
struct TenureKey {
  int position = 0;
  int trap = 0;
  int mother = 0;
  auto operator<=>(const TenureKey&) const = default;
};

struct Scope {
  enum class Kind : std::uint8_t { Experiment, Position, Trap };
  Kind kind = Kind::Experiment;
  int position = 0;
  int trap = 0;

  static Scope experiment() { return {}; }
  static Scope ofPosition(int position) { return {Kind::Position, position, 0}; }
  static Scope ofTrap(int position, int trap) { return {Kind::Trap, position, trap}; }

  bool covers(const TrapRef& t) const;
  bool coversPosition(int position) const;  // covers at least one trap of it
  auto operator<=>(const Scope&) const = default;
};

std::string_view toString(Scope::Kind kind);  // "experiment", "position", "trap"
std::optional<Scope::Kind> scopeKindFromString(std::string_view text);

// "experiment", "position:3", "trap:3/12" (ids) — the journal's target form.
std::string idText(const Scope& scope);
std::optional<Scope> scopeFromIdText(std::string_view text);
// "experiment", "position:pos01", "trap:pos01/12" — the form digests bind.
std::string namedText(const Scope& scope, std::string_view positionName);

}  // namespace budledger::store
