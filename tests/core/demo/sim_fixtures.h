#pragma once
// Shared helpers for the simulator tests: scenarios and truth turned into events.
#include <string>
#include <vector>

#include "core/base/events.h"
#include "demo/scenario.h"
#include "demo/simulator.h"

namespace budledger::demo::testing {

inline Scenario tinyScenario() {
  return loadScenario(std::string(BUDLEDGER_SOURCE_DIR) + "/demo/scenarios/tiny.json");
}

inline std::vector<Event> eventsOf(const PositionTruth& truth, int position = 0) {
  std::vector<Event> out;
  std::int64_t id = 1;
  for (const auto& e : truth.events) {
    Event ev;
    ev.id = id++;
    ev.position = position;
    ev.trap = e.trap;
    ev.frame = e.frame;
    ev.kind = e.kind;
    out.push_back(ev);
  }
  return out;
}

}  // namespace budledger::demo::testing
