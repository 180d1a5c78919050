#include "tests/core/store/fixture.h"

#include <unistd.h>

namespace budledger::store::testing {

std::vector<Event> plausibleProposals(int position, int trap, int frames, std::mt19937& rng) {
  std::uniform_int_distribution<int> gap(7, 11);
  std::uniform_real_distribution<double> conf(0.5, 1.0);
  std::bernoulli_distribution dies(0.5);
  const int end = dies(rng) ? frames * 3 / 4 : frames;
  std::vector<Event> out;
  auto push = [&](int frame, EventKind kind) {
    Event e;
    e.position = position;
    e.trap = trap;
    e.frame = frame;
    e.kind = kind;
    e.confidence = conf(rng);
    out.push_back(e);
  };
  for (int f = 2 + gap(rng) % 5; f + 4 < end; f += gap(rng)) {
    push(f, EventKind::Bud);
    push(f + 4, EventKind::Separation);
  }
  if (end < frames) push(end, EventKind::Death);
  return out;
}

Fixture makeFixture(Project& project, const FixtureOptions& o) {
  std::mt19937 rng(o.seed);
  Fixture fx;
  std::vector<Event> proposals;
  for (int p = 0; p < o.positions; ++p) {
    const int id =
        project.addPosition({0, o.prefix + std::to_string(p + 1), o.group, o.frames, 400, 300});
    fx.positions.push_back(id);
    std::vector<TrapRecord> traps;
    for (int t = 0; t < o.traps; ++t)
      traps.push_back({id, t, t / 4, t % 4, 40.0 + 80 * (t % 4), 40.0 + 80 * (t / 4), false});
    project.replaceTraps(id, traps);
    for (int t = 0; t < o.traps; ++t) {
      auto trapEvents = plausibleProposals(id, t, o.frames, rng);
      proposals.insert(proposals.end(), trapEvents.begin(), trapEvents.end());
    }
  }
  fx.run = project.addEngineRun({0, "", "test-engine 1", "{}", "digest"}, proposals);
  return fx;
}

std::filesystem::path scratchDir(const std::string& name) {
  const auto dir = std::filesystem::temp_directory_path() /
                   ("budledger_" + name + "_" + std::to_string(getpid()));
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  return dir;
}

}  // namespace budledger::store::testing
