#include "core/export/summary.h"

#include <fmt/format.h>

#include <map>

#include "core/lineage/lineage.h"

namespace budledger::exporting {

std::string projectSummary(store::Project& project) {
  std::string out = fmt::format("Project {}\n", project.path());
  const auto positions = project.positions();
  int frameCount = 0;
  for (const auto& p : positions) {
    const auto traps = project.traps(p.id);
    out += fmt::format("  position {} '{}' group '{}': {} frames of {}x{} px, {} traps\n", p.id,
                       p.name, p.group, p.frameCount, p.width, p.height, traps.size());
    frameCount = std::max(frameCount, p.frameCount);
  }
  if (positions.empty()) out += "  no positions yet\n";
  const auto run = project.latestRun();
  if (!run) {
    out += "  no engine run yet\n";
    return out;
  }
  const auto events = project.proposals(run->id);
  std::map<EventKind, int> byKind;
  for (const auto& e : events) ++byKind[e.kind];
  out += fmt::format("  engine run {} (engine {}): {} proposals", run->id, run->engineVersion,
                     events.size());
  for (EventKind k : kAllEventKinds) out += fmt::format(", {} {}", byKind[k], toString(k));
  out += "\n";
  const auto lineage = lineage::tenuresFromEvents(events, frameCount);
  int dead = 0;
  long divisions = 0;
  for (const auto& t : lineage.tenures) {
    dead += t.outcome == Outcome::Death;
    divisions += t.divisions;
  }
  out += fmt::format("  {} mothers ({} died, {} censored), {} divisions in all\n",
                     lineage.tenures.size(), dead,
                     lineage.tenures.size() - static_cast<size_t>(dead), divisions);
  return out;
}

}  // namespace budledger::exporting
