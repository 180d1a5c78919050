// journal_storm: a helper for the durability test and the CLI's end-to-end
// tests, not a user tool.
//   journal_storm fixture PATH [POSITIONS TRAPS FRAMES SEED PREFIX GROUP]
//     creates a project with positions, traps and one engine run (fixture.h).
//   journal_storm sql PATH SQL
//     runs SQL on PATH through a plain connection, as someone changing the
//     file behind BudLedger's back would (the end-to-end verify tests).
//   journal_storm storm PATH SEED [COUNT]
//     edits PATH at random, printing "ack <seq> <hash>" on stdout after each
//     edit has committed — the moment the edit counts as done — until COUNT
//     edits (default: until killed).
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <random>
#include <string>

#include "core/store/editor.h"
#include "core/store/materialised.h"
#include "tests/core/store/fixture.h"

using namespace budledger;
using namespace budledger::store;

namespace {

int fixture(int argc, char** argv) {
  testing::FixtureOptions o;
  auto arg = [&](int i, int fallback) { return argc > i ? std::atoi(argv[i]) : fallback; };
  o.positions = arg(3, 1);
  o.traps = arg(4, 3);
  o.frames = arg(5, 120);
  o.seed = static_cast<unsigned>(arg(6, 1));
  if (argc > 7) o.prefix = argv[7];
  if (argc > 8) o.group = argv[8];
  auto p = Project::create(argv[2]);
  p.setMeta(kMetaIntervalMin, "10");
  p.setMeta(kMetaPixelUm, "0.25");
  const auto fx = testing::makeFixture(p, o);
  std::printf("created %s: %zu positions, run %lld\n", argv[2], fx.positions.size(),
              static_cast<long long>(fx.run));
  return 0;
}

int storm(int argc, char** argv) {
  auto p = Project::open(argv[2]);
  if (p.readOnly()) {
    std::fprintf(stderr, "journal_storm: %s\n", p.readOnlyReason().c_str());
    return 1;
  }
  std::mt19937 rng(static_cast<unsigned>(std::atoi(argv[3])));
  const long count = argc > 4 ? std::atol(argv[4]) : -1;
  Editor ed(p);
  const auto events = currentEvents(p.db());
  const auto traps = p.traps();
  std::uniform_int_distribution<std::size_t> anyEvent(0, events.size() - 1);
  std::uniform_int_distribution<std::size_t> anyTrap(0, traps.size() - 1);
  std::uniform_int_distribution<int> op(0, 7);
  std::uniform_int_distribution<int> shift(-2, 2);
  for (long done = 0; count < 0 || done < count;) {
    const auto& e = events[anyEvent(rng)].event;
    Change c;
    try {
      switch (op(rng)) {
        case 0:
        case 1:
          c = ed.accept(testing::kTech, e.id, "storm");
          break;
        case 2:
          c = ed.reject(testing::kTech, e.id, "storm");
          break;
        case 3:
        case 4:
          c = ed.move(testing::kTech, e.id, e.frame + shift(rng), "storm");
          break;
        case 5: {
          const auto& t = traps[anyTrap(rng)];
          c = ed.add(testing::kTech, {t.position, t.trap}, static_cast<int>(rng() % 100),
                     EventKind::Bud, "storm");
          break;
        }
        case 6:
          c = ed.undo(testing::kTech, "storm");
          break;
        case 7:
          c = ed.redo(testing::kTech, "storm");
          break;
      }
    } catch (const EditRefused&) {
      continue;
    }
    if (!c.recorded()) continue;
    const auto head = journalHead(p.db());
    char line[128];
    const int n = std::snprintf(line, sizeof line, "ack %lld %s\n",
                                static_cast<long long>(head.seq), head.hash.c_str());
    // write(2), not stdio: once the line is out, it is out, whatever kills us next.
    if (write(STDOUT_FILENO, line, static_cast<std::size_t>(n)) != n) return 1;
    ++done;
  }
  return 0;
}

int sql(char** argv) {
  Database raw(argv[2], Database::Access::ReadWrite);
  raw.exec(argv[3]);
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  try {
    const std::string verb = argc > 1 ? argv[1] : "";
    if (verb == "fixture" && argc > 2) return fixture(argc, argv);
    if (verb == "storm" && argc > 3) return storm(argc, argv);
    if (verb == "sql" && argc > 3) return sql(argv);
    std::fprintf(stderr,
                 "usage: journal_storm fixture PATH [POSITIONS TRAPS FRAMES SEED PREFIX GROUP]\n"
                 "       journal_storm sql PATH SQL\n"
                 "       journal_storm storm PATH SEED [COUNT]\n");
    return 2;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "journal_storm: %s\n", e.what());
    return 1;
  }
}
