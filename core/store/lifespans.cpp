#include "core/store/lifespans.h"

#include <fmt/format.h>

#include <algorithm>
#include <tuple>

#include "core/base/sha256.h"
#include "core/store/materialised.h"

namespace budledger::store {
namespace {
std::string joined(const std::vector<int>& frames) {
  std::string out;
  for (std::size_t i = 0; i < frames.size(); ++i) {
    if (i) out += ',';
    out += std::to_string(frames[i]);
  }
  return out;
}
}  // namespace

std::vector<lineage::Tenure> tenuresInScope(const std::vector<CurrentEvent>& events,
                                            const std::map<TenureKey, OutcomeOverride>& overrides,
                                            const std::vector<PositionRecord>& positions,
                                            const Scope& scope) {
  std::vector<lineage::Tenure> out;
  for (const auto& p : positions) {
    if (!scope.coversPosition(p.id)) continue;
    std::vector<Event> counted;
    for (const auto& e : events)
      if (e.event.position == p.id && e.counts() && scope.covers({p.id, e.event.trap}))
        counted.push_back(e.event);
    auto result = lineage::tenuresFromEvents(std::move(counted), p.frameCount);
    for (auto& t : result.tenures) {
      const auto it = overrides.find({t.position, t.trap, t.mother});
      if (it != overrides.end()) t.outcome = it->second.outcome;
      out.push_back(std::move(t));
    }
  }
  return out;
}

std::string lifespansCanonicalText(const std::vector<lineage::Tenure>& tenures,
                                   const std::map<int, std::string>& names,
                                   std::string_view scopeName) {
  std::vector<std::tuple<std::string, int, int, std::string>> rows;
  rows.reserve(tenures.size());
  for (const auto& t : tenures) {
    const auto it = names.find(t.position);
    std::string name = it != names.end() ? it->second : std::to_string(t.position);
    auto line = fmt::format("{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\t{}\n", name, t.trap, t.mother,
                            t.firstFrame, t.lastFrame, t.divisions, toString(t.outcome),
                            joined(t.separationFrames), joined(t.budFrames));
    rows.emplace_back(std::move(name), t.trap, t.mother, std::move(line));
  }
  std::sort(rows.begin(), rows.end());
  std::string out = fmt::format("budledger-lifespans/1\nscope={}\n", scopeName);
  for (const auto& r : rows) out += std::get<3>(r);
  return out;
}

std::string lifespansDigest(const std::vector<lineage::Tenure>& tenures,
                            const std::map<int, std::string>& names, std::string_view scopeName) {
  return sha256Hex(lifespansCanonicalText(tenures, names, scopeName));
}

std::string scopeName(const Scope& scope, const std::vector<PositionRecord>& positions) {
  if (scope.kind == Scope::Kind::Experiment) return namedText(scope, "");
  for (const auto& p : positions)
    if (p.id == scope.position) return namedText(scope, p.name);
  throw StoreError(fmt::format("no position with id {}", scope.position));
}

std::vector<lineage::Tenure> currentTenures(Project& project, const Scope& scope) {
  auto& db = project.db();
  const auto events = scope.kind == Scope::Kind::Experiment ? currentEvents(db)
                      : scope.kind == Scope::Kind::Position
                          ? currentEvents(db, scope.position)
                          : currentEvents(db, TrapRef{scope.position, scope.trap});
  return tenuresInScope(events, outcomeOverrides(db), project.positions(), scope);
}

std::string currentLifespansDigest(Project& project, const Scope& scope) {
  const auto positions = project.positions();
  std::map<int, std::string> names;
  for (const auto& p : positions) names[p.id] = p.name;
  return lifespansDigest(currentTenures(project, scope), names, scopeName(scope, positions));
}

std::optional<int> motherOf(const std::vector<lineage::Tenure>& trapTenures, int frame) {
  std::optional<int> mother;
  for (const auto& t : trapTenures)
    if (t.firstFrame <= frame) mother = t.mother;
  return mother;
}

}  // namespace budledger::store
