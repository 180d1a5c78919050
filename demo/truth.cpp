#include "demo/truth.h"

#include <fmt/format.h>

#include <algorithm>
#include <cstdio>
#include <memory>

#include "core/base/error.h"

namespace budledger::demo {
namespace {

int tieOrder(EventKind k) {
  switch (k) {
    case EventKind::Arrival:
      return 0;
    case EventKind::Bud:
      return 1;
    case EventKind::Separation:
      return 2;
    case EventKind::Death:
      return 3;
    case EventKind::Washout:
      return 4;
  }
  return 5;
}

struct FileCloser {
  void operator()(std::FILE* f) const {
    if (f) std::fclose(f);
  }
};
using File = std::unique_ptr<std::FILE, FileCloser>;

File openForWrite(const std::filesystem::path& p) {
  File f(std::fopen(p.string().c_str(), "wb"));
  if (!f) throw InputError(p.string(), std::nullopt, "cannot be written");
  return f;
}

void closeChecked(File f, const std::filesystem::path& p) {
  if (std::fflush(f.get()) != 0 || std::ferror(f.get()))
    throw InputError(p.string(), std::nullopt, "write failed");
}

}  // namespace

void appendTrapTruth(int trap, const TrapLife& life, int frames, double intervalMin,
                     PositionTruth& out) {
  int nextMother = 0;
  for (const Occupant& m : life.occupants) {
    const int first = m.initial ? 0 : frameAt(m.tStart, intervalMin);
    const int end = std::min(frames, m.tEnd == kNever ? frames : frameAt(m.tEnd, intervalMin));
    if (first >= end) continue;  // never seen seated
    const int death = m.tDeath == kNever ? frames : frameAt(m.tDeath, intervalMin);
    const bool died = death < end;
    const double t0 = m.initial ? 0.0 : m.tStart;

    std::vector<TruthEvent> ev;
    const int id = nextMother;
    auto add = [&](int frame, EventKind kind) { ev.push_back({trap, id, frame, kind}); };
    if (!m.initial) add(first, EventKind::Arrival);
    int divisions = 0;
    for (const Division& d : m.divisions) {
      if (d.tBud >= t0) {
        const int f = frameAt(d.tBud, intervalMin);
        if (f < end && (!died || f <= death)) add(f, EventKind::Bud);
      }
      if (d.tSep != kNever && d.tSep >= t0) {
        const int f = frameAt(d.tSep, intervalMin);
        if (f < end && (!died || f <= death)) {
          add(f, EventKind::Separation);
          ++divisions;
        }
      }
    }
    if (died) add(death, EventKind::Death);
    const bool washed = m.washedOut && end < frames;
    if (washed) add(end, EventKind::Washout);
    if (ev.empty()) continue;  // silent from frame 0 to the end: invisible to the events

    ++nextMother;
    out.events.insert(out.events.end(), ev.begin(), ev.end());
    TruthTenure t;
    t.trap = trap;
    t.mother = id;
    t.firstFrame = first;
    t.lastFrame = died ? death : (washed ? end - 1 : frames - 1);
    t.divisions = divisions;
    t.died = died;
    out.tenures.push_back(t);
  }
}

void writeTruth(const std::filesystem::path& dir, const Device& device, const PositionTruth& truth,
                const std::vector<Vec2>& drift) {
  std::filesystem::create_directories(dir);
  {
    const auto p = dir / "traps.csv";
    File f = openForWrite(p);
    fmt::print(f.get(), "trap_id,row,col,x,y\n");
    for (const Trap& t : device.traps())
      fmt::print(f.get(), "{},{},{},{:.3f},{:.3f}\n", t.id, t.row, t.col, t.seatPx.x, t.seatPx.y);
    closeChecked(std::move(f), p);
  }
  {
    auto events = truth.events;
    std::stable_sort(events.begin(), events.end(), [](const TruthEvent& a, const TruthEvent& b) {
      if (a.trap != b.trap) return a.trap < b.trap;
      if (a.frame != b.frame) return a.frame < b.frame;
      return tieOrder(a.kind) < tieOrder(b.kind);
    });
    const auto p = dir / "events.csv";
    File f = openForWrite(p);
    fmt::print(f.get(), "trap_id,mother_id,frame,kind\n");
    for (const auto& e : events)
      fmt::print(f.get(), "{},{},{},{}\n", e.trap, e.mother, e.frame, toString(e.kind));
    closeChecked(std::move(f), p);
  }
  {
    const auto p = dir / "lifespans.csv";
    File f = openForWrite(p);
    fmt::print(f.get(), "trap_id,mother_id,first_frame,last_frame,divisions,outcome\n");
    for (const auto& t : truth.tenures)
      fmt::print(f.get(), "{},{},{},{},{},{}\n", t.trap, t.mother, t.firstFrame, t.lastFrame,
                 t.divisions, t.died ? "death" : "censored");
    closeChecked(std::move(f), p);
  }
  {
    const auto p = dir / "drift.csv";
    File f = openForWrite(p);
    fmt::print(f.get(), "frame,dx,dy\n");
    for (std::size_t k = 0; k < drift.size(); ++k)
      fmt::print(f.get(), "{},{:.4f},{:.4f}\n", k, drift[k].x, drift[k].y);
    closeChecked(std::move(f), p);
  }
}

}  // namespace budledger::demo
