// bench_store [WORKDIR] — measures, in one run on one disk:
//  1. a single edit's commit latency (Editor::move: journal entry with its
//     SHA-256, materialised update, undo stack, one IMMEDIATE transaction)
//     against a bare SQLite INSERT + COMMIT, both WAL and synchronous=FULL,
//     interleaved so both see the same disk and the same neighbours;
//  2. edits per second in a scripted batch (one transaction per edit);
//  3. replay of a 100,000-entry journal: reading it, the pure replay, and a
//     full verify (hash chain, replay, comparison, digests).
// WORKDIR defaults to ./bench_store_work (the disk the figures are about).
// bench_store WORKDIR latency — only part 1.
// bench_store WORKDIR replay FILE — only part 3, on an existing project
// (kept from an earlier run with `bench_store WORKDIR keep`).
#include <fmt/format.h>
#include <sqlite3.h>

#include <algorithm>
#include <chrono>
#include <ctime>
#include <filesystem>
#include <random>
#include <vector>

#include "core/store/editor.h"
#include "core/store/materialised.h"
#include "core/store/replay.h"
#include "core/store/verify.h"

using namespace budledger;
using namespace budledger::store;
using Clock = std::chrono::steady_clock;

namespace {

double ms(Clock::duration d) { return std::chrono::duration<double, std::milli>(d).count(); }

// Processor time of this process: on a shared, busy machine the wall clock
// also counts the time others had the cores.
double cpuMs() { return 1000.0 * static_cast<double>(std::clock()) / CLOCKS_PER_SEC; }

double percentile(std::vector<double> v, double p) {
  std::sort(v.begin(), v.end());
  return v[static_cast<std::size_t>(p * static_cast<double>(v.size() - 1))];
}

// A project with `positions` × `traps` traps and plausible proposals.
std::vector<CurrentEvent> makeProject(Project& p, int positions, int traps, int frames,
                                      std::mt19937& rng) {
  std::vector<Event> proposals;
  for (int i = 0; i < positions; ++i) {
    const int pos =
        p.addPosition({0, fmt::format("pos{:02}", i + 1), "control", frames, 1000, 700});
    std::vector<TrapRecord> recs;
    for (int t = 0; t < traps; ++t) recs.push_back({pos, t, t / 7, t % 7, 0, 0, false});
    p.replaceTraps(pos, recs);
    for (int t = 0; t < traps; ++t)
      for (int f = 3 + static_cast<int>(rng() % 4); f + 4 < frames;
           f += 8 + static_cast<int>(rng() % 4)) {
        proposals.push_back({0, pos, t, f, EventKind::Bud, 0.9});
        proposals.push_back({0, pos, t, f + 4, EventKind::Separation, 0.8});
      }
  }
  p.addEngineRun({0, "", "bench", "{}", ""}, proposals);
  return currentEvents(p.db());
}

struct Bare {
  explicit Bare(const std::string& path) {
    sqlite3_open(path.c_str(), &db);
    exec("PRAGMA journal_mode = WAL");
    exec("PRAGMA synchronous = FULL");
    exec("CREATE TABLE IF NOT EXISTS t(id INTEGER PRIMARY KEY, payload TEXT NOT NULL)");
    sqlite3_prepare_v2(db, "INSERT INTO t(payload) VALUES (?1)", -1, &ins, nullptr);
  }
  ~Bare() {
    sqlite3_finalize(ins);
    sqlite3_close(db);
  }
  void exec(const char* sql) { sqlite3_exec(db, sql, nullptr, nullptr, nullptr); }
  void commitOne(const std::string& payload) {
    exec("BEGIN IMMEDIATE");
    sqlite3_bind_text(ins, 1, payload.data(), static_cast<int>(payload.size()), SQLITE_STATIC);
    sqlite3_step(ins);
    sqlite3_reset(ins);
    exec("COMMIT");
  }
  sqlite3* db = nullptr;
  sqlite3_stmt* ins = nullptr;
};

}  // namespace

void measureReplay(Project& p) {
  auto& db = p.db();
  const auto t0 = Clock::now();
  const double c0 = cpuMs();
  const auto entries = readJournal(db);
  const auto sources = loadReplaySources(db);
  const auto t1 = Clock::now();
  const double c1 = cpuMs();
  const auto r = replay(entries, sources);
  const auto t2 = Clock::now();
  const double c2 = cpuMs();
  if (r.problem) fmt::print("  replay problem at {}: {}\n", r.problem->seq, r.problem->what);
  const auto report = verifyProject(p);
  const auto t3 = Clock::now();
  const double c3 = cpuMs();
  fmt::print("  read journal + proposals   wall {:5.0f} ms  cpu {:5.0f} ms  ({} entries)\n",
             ms(t1 - t0), c1 - c0, entries.size());
  fmt::print("  replay (pure)              wall {:5.0f} ms  cpu {:5.0f} ms  ({} events)\n",
             ms(t2 - t1), c2 - c1, r.state.events.size());
  fmt::print("  verify (chain+replay+cmp)  wall {:5.0f} ms  cpu {:5.0f} ms  {}\n", ms(t3 - t2),
             c3 - c2, report.ok() ? "ok" : report.problems.front());
  if (!p.readOnly()) {
    const auto t4 = Clock::now();
    const double c4 = cpuMs();
    rebuildState(db);
    fmt::print("  rebuild materialised state wall {:5.0f} ms  cpu {:5.0f} ms\n",
               ms(Clock::now() - t4), cpuMs() - c4);
  }
}

int main(int argc, char** argv) {
  const std::filesystem::path work = argc > 1 ? argv[1] : "bench_store_work";
  const std::string mode = argc > 2 ? argv[2] : "";
  if (mode == "replay" && argc > 3) {
    auto p = Project::open(argv[3]);
    measureReplay(p);
    return 0;
  }
  std::filesystem::remove_all(work);
  std::filesystem::create_directories(work);
  std::mt19937 rng(42);
  const Actor tech{"bench", "technician"};

  // 1. Single-edit latency against a bare commit, interleaved.
  {
    auto p = Project::create((work / "latency.budledger").string());
    const auto events = makeProject(p, 2, 42, 240, rng);
    Editor ed(p);
    Bare bare((work / "bare.db").string());
    const std::string payload(200, 'x');  // about one journal row's size
    // Both WAL files start the measurement already grown past a checkpoint
    // (the project's by writing its proposals), so neither commit pays for
    // extending its file — an fsync that must also journal a new file size
    // costs several times one that does not.
    bare.exec("BEGIN");
    for (int i = 0; i < 20000; ++i) {
      sqlite3_bind_text(bare.ins, 1, payload.data(), static_cast<int>(payload.size()),
                        SQLITE_STATIC);
      sqlite3_step(bare.ins);
      sqlite3_reset(bare.ins);
    }
    bare.exec("COMMIT");
    std::vector<double> edit, raw, editCpu, rawCpu;
    constexpr int kWarm = 20, kN = 600;
    for (int i = 0; i < kWarm + kN; ++i) {
      const auto& e = events[rng() % events.size()].event;
      const int frame = std::min(e.frame + 1 + static_cast<int>(rng() % 2), 239);
      // Alternate which goes first, so neither always follows the other's fsync.
      double bareCpu = 0;
      auto timeBare = [&] {
        const auto t = Clock::now();
        const double c = cpuMs();
        bare.commitOne(payload);
        bareCpu = cpuMs() - c;
        return ms(Clock::now() - t);
      };
      const double bareFirst = i % 2 ? timeBare() : -1;
      const auto t0 = Clock::now();
      const double c0 = cpuMs();
      try {
        ed.move(tech, e.id, frame);
      } catch (const EditRefused&) {
        --i;  // a duplicate at that frame: not a commit, draw again
        continue;
      }
      const double editMs = ms(Clock::now() - t0);
      const double editCpuMs = cpuMs() - c0;
      const double bareMs = bareFirst >= 0 ? bareFirst : timeBare();
      if (i >= kWarm) {
        edit.push_back(editMs);
        raw.push_back(bareMs);
        editCpu.push_back(editCpuMs);
        rawCpu.push_back(bareCpu);
      }
    }
    const double me = percentile(edit, 0.5), mr = percentile(raw, 0.5);
    fmt::print("single commit, WAL, synchronous=FULL, {} each, interleaved\n", kN);
    auto mean = [](const std::vector<double>& v) {
      double s = 0;
      for (double x : v) s += x;
      return s / static_cast<double>(v.size());
    };
    fmt::print("  bare INSERT+COMMIT   median {:.3f} ms  p90 {:.3f} ms  cpu {:.3f} ms mean\n", mr,
               percentile(raw, 0.9), mean(rawCpu));
    fmt::print("  Editor::move         median {:.3f} ms  p90 {:.3f} ms  cpu {:.3f} ms mean\n", me,
               percentile(edit, 0.9), mean(editCpu));
    fmt::print("  ratio (median)       {:.2f}x\n", me / mr);
  }
  if (mode == "latency") {
    std::filesystem::remove_all(work);
    return 0;
  }

  // 2. A scripted batch: one transaction per edit, as `edit --batch` does.
  {
    auto p = Project::create((work / "batch.budledger").string());
    const auto events = makeProject(p, 2, 42, 240, rng);
    Editor ed(p);
    constexpr int kN = 2000;
    const auto t0 = Clock::now();
    int done = 0;
    for (int i = 0; i < kN; ++i) {
      const auto& e = events[static_cast<std::size_t>(i) % events.size()].event;
      done += (i % 3 == 0 ? ed.reject(tech, e.id) : ed.accept(tech, e.id)).recorded();
    }
    const double s = ms(Clock::now() - t0) / 1000;
    fmt::print("batch of {} edits (one transaction each): {:.2f} s, {:.0f} edits/s\n", done, s,
               done / s);
  }

  // 3. Replay of 100,000 entries.
  {
    auto p = Project::create((work / "replay.budledger").string());
    const auto events = makeProject(p, 4, 100, 240, rng);
    // Building the journal is not what is measured: spare the disk 100k fsyncs.
    p.db().exec("PRAGMA synchronous = OFF");
    Editor ed(p);
    std::int64_t n = journalHead(p.db()).seq;
    const auto tb = Clock::now();
    while (n < 100000) {
      const auto& e = events[rng() % events.size()].event;
      Change c;
      try {
        switch (rng() % 6) {
          case 0:
            c = ed.reject(tech, e.id);
            break;
          case 1:
          case 2:
            c = ed.move(tech, e.id, std::max(0, e.frame + static_cast<int>(rng() % 5) - 2));
            break;
          case 3:
            c = ed.undo(tech);
            break;
          default:
            c = ed.accept(tech, e.id);
        }
      } catch (const EditRefused&) {
        continue;
      }
      n += c.recorded();
    }
    fmt::print("built a {}-entry journal over {} proposals in {:.1f} s (synchronous=OFF)\n", n,
               events.size(), ms(Clock::now() - tb) / 1000);
    measureReplay(p);
  }
  if (mode == "keep") return 0;
  std::filesystem::remove_all(work);
  return 0;
}
