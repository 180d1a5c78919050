#include "demo_project.h"

#include <algorithm>
#include <random>

#include "core/store/project.h"

namespace budledger::testsupport {

std::vector<Event> writeDemoProject(const QString& path, const DemoOptions& o) {
  auto project = store::Project::create(path.toStdString());
  project.setMeta("interval_min", std::to_string(o.intervalMinutes));
  std::mt19937 rng(o.seed);
  auto uniform = [&](double a, double b) { return std::uniform_real_distribution<>(a, b)(rng); };
  auto integer = [&](int a, int b) { return std::uniform_int_distribution<>(a, b)(rng); };
  const char* groups[] = {"control", "mutant-a", "mutant-b"};
  std::vector<Event> proposals;
  std::vector<store::MeasurementRecord> measurements;
  for (int pi = 0; pi < o.positions; ++pi) {
    store::PositionRecord pos{0,  "pos" + std::to_string(pi + 1), groups[pi % 3], o.frames, 1024,
                              768};
    const int pid = project.addPosition(pos);
    std::vector<store::TrapRecord> traps;
    for (int r = 0; r < o.rows; ++r)
      for (int c = 0; c < o.cols; ++c)
        traps.push_back({pid, r * o.cols + c, r, c, 60.0 + c * 90, 80.0 + r * 120, c == 0});
    project.replaceTraps(pid, traps);
    std::vector<store::DriftRecord> drift;
    for (int f = 0; f < o.frames; ++f) {
      const bool bump = f == o.frames / 3;  // one frame where registration struggled
      drift.push_back({pid, f, 0.05 * f + (bump ? 6.0 : 0.0), -0.03 * f, bump ? 0.3 : 0.95, 1.0});
    }
    project.replaceDrift(pid, drift);
    for (const auto& t : traps) {
      int frame = 0;
      if (t.trap % 5 == 3) {  // this trap starts empty; a mother arrives
        frame = integer(3, 12);
        proposals.push_back({0, pid, t.trap, frame, EventKind::Arrival, uniform(0.6, 0.99)});
      }
      const int end = t.trap % 4 == 1 ? integer(o.frames / 2, o.frames - 5) : o.frames;
      const bool dies = t.trap % 3 != 2;
      for (;;) {
        const int cycle = integer(9, 13);
        const int bud = frame + integer(1, 3);
        const int sep = frame + cycle;
        if (sep >= end) break;
        proposals.push_back({0, pid, t.trap, bud, EventKind::Bud, uniform(0.55, 0.99)});
        proposals.push_back({0, pid, t.trap, sep, EventKind::Separation, uniform(0.35, 0.99)});
        frame = sep;
      }
      if (end < o.frames)
        proposals.push_back({0, pid, t.trap, end, dies ? EventKind::Death : EventKind::Washout,
                             uniform(0.5, 0.95)});
      for (int f = 0; f < o.frames; ++f) {
        store::MeasurementRecord m;
        m.position = pid;
        m.trap = t.trap;
        m.frame = f;
        const bool crowded = t.trap % 7 == 5 && f > o.frames / 2 && f < o.frames / 2 + 12;
        m.occupancy = crowded ? Occupancy::Crowded : Occupancy::Budded;
        m.pCrowded = crowded ? 0.8 : 0.05;
        m.pBudded = crowded ? 0.1 : 0.7;
        m.pSingle = 1 - m.pCrowded - m.pBudded;
        m.cellCount = crowded ? 4 : 2;
        measurements.push_back(m);
      }
    }
  }
  const store::EngineRun run{0, store::utcNowIso(), "test-support", "{}", "none"};
  const auto runId = project.addEngineRun(run, proposals);
  project.addMeasurements(runId, measurements);
  return project.proposals(runId);
}

}  // namespace budledger::testsupport
