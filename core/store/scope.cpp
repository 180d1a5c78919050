#include "core/store/scope.h"

#include <fmt/format.h>

#include <charconv>

namespace budledger::store {
namespace {
std::optional<int> toInt(std::string_view s) {
  int v = 0;
  const auto* end = s.data() + s.size();
  auto [p, ec] = std::from_chars(s.data(), end, v);
  if (ec != std::errc() || p != end || s.empty()) return std::nullopt;
  return v;
}
}  // namespace

bool Scope::covers(const TrapRef& t) const {
  switch (kind) {
    case Kind::Experiment:
      return true;
    case Kind::Position:
      return t.position == position;
    case Kind::Trap:
      return t.position == position && t.trap == trap;
  }
  return false;
}

bool Scope::coversPosition(int p) const { return kind == Kind::Experiment || position == p; }

std::string_view toString(Scope::Kind kind) {
  switch (kind) {
    case Scope::Kind::Experiment:
      return "experiment";
    case Scope::Kind::Position:
      return "position";
    case Scope::Kind::Trap:
      return "trap";
  }
  return "?";
}

std::optional<Scope::Kind> scopeKindFromString(std::string_view t) {
  if (t == "experiment") return Scope::Kind::Experiment;
  if (t == "position") return Scope::Kind::Position;
  if (t == "trap") return Scope::Kind::Trap;
  return std::nullopt;
}

std::string idText(const Scope& s) {
  switch (s.kind) {
    case Scope::Kind::Experiment:
      return "experiment";
    case Scope::Kind::Position:
      return fmt::format("position:{}", s.position);
    case Scope::Kind::Trap:
      return fmt::format("trap:{}/{}", s.position, s.trap);
  }
  return "?";
}

std::optional<Scope> scopeFromIdText(std::string_view t) {
  if (t == "experiment") return Scope::experiment();
  if (t.starts_with("position:")) {
    if (auto p = toInt(t.substr(9))) return Scope::ofPosition(*p);
    return std::nullopt;
  }
  if (t.starts_with("trap:")) {
    const auto rest = t.substr(5);
    const auto slash = rest.find('/');
    if (slash == std::string_view::npos) return std::nullopt;
    auto p = toInt(rest.substr(0, slash));
    auto tr = toInt(rest.substr(slash + 1));
    if (p && tr) return Scope::ofTrap(*p, *tr);
  }
  return std::nullopt;
}

std::string namedText(const Scope& s, std::string_view positionName) {
  switch (s.kind) {
    case Scope::Kind::Experiment:
      return "experiment";
    case Scope::Kind::Position:
      return fmt::format("position:{}", positionName);
    case Scope::Kind::Trap:
      return fmt::format("trap:{}/{}", positionName, s.trap);
  }
  return "?";
}

}  // namespace budledger::store
