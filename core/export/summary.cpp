#include "core/export/summary.h"

#include <fmt/format.h>

#include <map>
#include <set>

#include "core/lineage/lineage.h"
#include "core/store/lifespans.h"
#include "core/store/materialised.h"

namespace budledger::exporting {

std::string projectSummary(store::Project& project) {
  std::string out = fmt::format("Project {}\n", project.path());
  const auto positions = project.positions();
  for (const auto& p : positions) {
    const auto traps = project.traps(p.id);
    out += fmt::format("  position {} '{}' group '{}': {} frames of {}x{} px, {} traps\n", p.id,
                       p.name, p.group, p.frameCount, p.width, p.height, traps.size());
  }
  if (positions.empty()) out += "  no positions yet\n";
  const auto runs = project.runs();
  if (runs.empty()) {
    out += "  no engine run yet\n";
    return out;
  }
  // One line a run: a project grown by several analyses has one run each.
  for (const auto& run : runs) {
    const auto events = project.proposals(run.id);
    std::map<EventKind, int> byKind;
    std::set<int> covered;
    for (const auto& e : events) {
      ++byKind[e.kind];
      covered.insert(e.position);
    }
    out += fmt::format("  engine run {} (engine {}, {} position{}): {} proposals", run.id,
                       run.engineVersion, covered.size(), covered.size() == 1 ? "" : "s",
                       events.size());
    for (EventKind k : kAllEventKinds) out += fmt::format(", {} {}", byKind[k], toString(k));
    out += "\n";
  }
  // Lifespans as they stand after the journal (every position's latest run
  // and the decisions people took), not the latest run's proposals alone.
  std::map<store::EventStatus, int> byStatus;
  for (const auto& e : store::currentEvents(project.db())) ++byStatus[e.status];
  out += fmt::format("  events now: {} proposed, {} accepted, {} moved, {} added, {} rejected\n",
                     byStatus[store::EventStatus::Proposed], byStatus[store::EventStatus::Accepted],
                     byStatus[store::EventStatus::Moved], byStatus[store::EventStatus::Added],
                     byStatus[store::EventStatus::Rejected]);
  const auto tenures = store::currentTenures(project);
  int dead = 0;
  long divisions = 0;
  for (const auto& t : tenures) {
    dead += t.outcome == Outcome::Death;
    divisions += t.divisions;
  }
  out += fmt::format("  {} mothers ({} died, {} censored), {} divisions in all\n", tenures.size(),
                     dead, tenures.size() - static_cast<size_t>(dead), divisions);
  return out;
}

}  // namespace budledger::exporting
