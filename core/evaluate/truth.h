#pragma once
// Truth: what the simulator knows about a generated experiment, read from its
// output folder (docs/simulator.md): positions.csv, and per position
// truth/<position>/{traps,events,lifespans,drift}.csv. This is the only code
// that reads that layout; a malformed file raises InputError naming the file
// and row.
#include <string>
#include <vector>

#include "core/base/events.h"

namespace budledger::evaluate {

struct TruthTrap {
  int trap = 0;
  int row = 0;
  int col = 0;
  double x = 0;  // cup centre, frame-0 pixels
  double y = 0;
};

struct TruthEvent {
  int trap = 0;
  int mother = 0;
  int frame = 0;  // first frame at which the event is visible
  EventKind kind = EventKind::Bud;
};

struct TruthTenure {
  int trap = 0;
  int mother = 0;
  int firstFrame = 0;
  int lastFrame = 0;
  int divisions = 0;
  bool died = false;  // else censored
};

struct TruthPosition {
  std::string name;
  std::string group;
  std::string file;
  int frames = 0;
  double intervalMin = 0;
  double pixelUm = 0;
  std::vector<TruthTrap> traps;
  std::vector<TruthEvent> events;
  std::vector<TruthTenure> tenures;
};

struct Truth {
  std::string folder;
  std::vector<TruthPosition> positions;
};

Truth readTruth(const std::string& folder);

// What a trap shows at each frame according to the truth: 0 empty, 1 a live mother
// without a bud, 2 a live mother with a bud, -1 a dead mother (left out of training:
// the temporal model, not the classifier, decides death).
enum TruthOccupancy { kTruthDead = -1, kTruthEmpty = 0, kTruthSingle = 1, kTruthBudded = 2 };
std::vector<int> truthOccupancy(const TruthPosition& position, int trap);

}  // namespace budledger::evaluate
