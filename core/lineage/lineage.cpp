#include "core/lineage/lineage.h"

#include <algorithm>
#include <map>

namespace budledger::lineage {
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

// Walks one trap's events, frame-ordered, opening and closing tenures.
class TrapWalker {
 public:
  TrapWalker(int position, int trap, int lastFrame, LineageResult& out)
      : position_(position), trap_(trap), lastFrame_(lastFrame), out_(out) {}

  void feed(const Event& e) {
    switch (e.kind) {
      case EventKind::Arrival:
        if (isOpen_) close(std::max(open_.firstFrame, e.frame - 1), Outcome::Washout);
        open(e.frame);
        return;
      case EventKind::Bud:
      case EventKind::Separation:
        if (dead_) {
          out_.ignored.push_back(e.id);
          return;
        }
        if (!isOpen_) open(0);
        if (e.kind == EventKind::Bud)
          open_.budFrames.push_back(e.frame);
        else
          open_.separationFrames.push_back(e.frame);
        return;
      case EventKind::Death:
      case EventKind::Washout:
        if (dead_) {
          out_.ignored.push_back(e.id);
          return;
        }
        if (!isOpen_) open(0);
        if (e.kind == EventKind::Death) {
          // Keep the tenure open-but-dead until the next arrival or the end:
          // a dead mother usually stays in the cup.
          deathFrame_ = e.frame;
          dead_ = true;
        } else {
          // A washout's frame is the first frame without the mother.
          close(e.frame - 1, Outcome::Washout);
        }
        return;
    }
  }

  void finish() {
    if (isOpen_) close(lastFrame_, Outcome::EndOfImaging);
  }

 private:
  void open(int frame) {
    open_ = Tenure{};
    isOpen_ = true;
    open_.position = position_;
    open_.trap = trap_;
    open_.mother = nextMother_++;
    open_.firstFrame = frame;
    dead_ = false;
  }

  void close(int frame, Outcome outcome) {
    if (dead_) {
      outcome = Outcome::Death;
      frame = deathFrame_;
    }
    open_.lastFrame = std::max(open_.firstFrame, frame);
    open_.outcome = outcome;
    open_.divisions = static_cast<int>(open_.separationFrames.size());
    out_.tenures.push_back(std::move(open_));
    open_ = Tenure{};
    isOpen_ = false;
    dead_ = false;
  }

  int position_;
  int trap_;
  int lastFrame_;
  LineageResult& out_;
  Tenure open_;
  bool isOpen_ = false;
  bool dead_ = false;
  int deathFrame_ = 0;
  int nextMother_ = 0;
};

}  // namespace

LineageResult tenuresFromEvents(std::vector<Event> events, int frameCount) {
  std::stable_sort(events.begin(), events.end(), [](const Event& a, const Event& b) {
    if (a.position != b.position) return a.position < b.position;
    if (a.trap != b.trap) return a.trap < b.trap;
    if (a.frame != b.frame) return a.frame < b.frame;
    return tieOrder(a.kind) < tieOrder(b.kind);
  });
  LineageResult result;
  const int lastFrame = std::max(0, frameCount - 1);
  std::size_t i = 0;
  while (i < events.size()) {
    const int position = events[i].position;
    const int trap = events[i].trap;
    TrapWalker walker(position, trap, lastFrame, result);
    for (; i < events.size() && events[i].position == position && events[i].trap == trap; ++i)
      walker.feed(events[i]);
    walker.finish();
  }
  return result;
}

}  // namespace budledger::lineage
