#include "core/export/csv_exports.h"

#include <fmt/format.h>

#include <charconv>
#include <map>
#include <optional>

#include "core/store/lifespans.h"
#include "core/store/materialised.h"

namespace budledger::exporting {
namespace {

std::string field(std::string_view s) {
  if (s.find_first_of(",\"\r\n") == std::string_view::npos) return std::string(s);
  std::string out = "\"";
  for (char c : s) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + '"';
}

std::optional<double> intervalMin(store::Project& project) {
  const auto text = project.meta(store::kMetaIntervalMin);
  if (!text) return std::nullopt;
  double v = 0;
  const auto [p, ec] = std::from_chars(text->data(), text->data() + text->size(), v);
  if (ec != std::errc() || p != text->data() + text->size() || v <= 0) return std::nullopt;
  return v;
}

using TrapTenures = std::map<store::TrapRef, std::vector<lineage::Tenure>>;

TrapTenures byTrap(std::vector<lineage::Tenure> tenures) {
  TrapTenures out;
  for (auto& t : tenures) out[{t.position, t.trap}].push_back(std::move(t));
  return out;
}

}  // namespace

void writeEventsCsv(store::Project& project, std::ostream& out) {
  const auto positions = project.positions();
  std::map<int, const store::PositionRecord*> pos;
  for (const auto& p : positions) pos[p.id] = &p;
  const auto interval = intervalMin(project);
  const auto tenures = byTrap(store::currentTenures(project));
  out << "position,group,trap_id,mother_id,frame,time_min,kind,confidence,status\n";
  for (const auto& e : store::currentEvents(project.db())) {
    const auto& p = *pos.at(e.event.position);
    std::string mother;
    if (e.counts()) {
      const auto it = tenures.find({e.event.position, e.event.trap});
      if (it != tenures.end())
        if (auto m = store::motherOf(it->second, e.event.frame)) mother = std::to_string(*m);
    }
    out << fmt::format("{},{},{},{},{},{},{},{},{}\n", field(p.name), field(p.group), e.event.trap,
                       mother, e.event.frame,
                       interval ? fmt::format("{}", e.event.frame * *interval) : "",
                       toString(e.event.kind), e.event.confidence, toString(e.status));
  }
}

void writeLifespansCsv(store::Project& project, std::ostream& out) {
  const auto positions = project.positions();
  std::map<int, const store::PositionRecord*> pos;
  for (const auto& p : positions) pos[p.id] = &p;
  out << "position,group,trap_id,mother_id,first_frame,last_frame,divisions,outcome,"
         "censor_reason\n";
  for (const auto& t : store::currentTenures(project)) {
    const auto& p = *pos.at(t.position);
    out << fmt::format("{},{},{},{},{},{},{},{},{}\n", field(p.name), field(p.group), t.trap,
                       t.mother, t.firstFrame, t.lastFrame, t.divisions,
                       isCensored(t.outcome) ? "censored" : "death",
                       isCensored(t.outcome) ? toString(t.outcome) : "");
  }
}

}  // namespace budledger::exporting
