#pragma once
// Biology: the life of every trap of one position in continuous time (minutes
// from the first frame), drawn once before any image is rendered. A trap holds
// a sequence of occupants (mothers); each mother divides with intervals that
// lengthen before death, dies after a Gompertz-distributed number of
// divisions unless the flow washes her out first, and may leave a corpse that
// stays or is flushed later; an empty trap captures a newborn cell from
// upstream at a constant rate. Images and truth are both read off this one
// record, so what is drawn and what is counted cannot disagree.
// Invariants: occupants of a trap are in time order and never overlap, and a
// new occupant arrives at least one frame after the previous one has left.
#include <cstdint>
#include <limits>
#include <vector>

#include "demo/rng.h"
#include "demo/scenario.h"

namespace budledger::demo {

inline constexpr double kNever = std::numeric_limits<double>::infinity();

struct Division {
  double cycleStart = 0.0;  // previous separation (or birth)
  double tBud = 0.0;        // bud reaches visible size
  double tSep = kNever;     // daughter separates; kNever: a last bud that never separates
  double angle = 0.0;       // bud direction in the trap frame, radians, 0 = downstream
  bool upstream = false;
  double daughterRadiusUm = 2.0;  // at separation
  double tGone = kNever;          // daughter out of view
  bool lodged = false;            // daughter lodged beside the mother (crowding)
  double lodgeAngle = 0.0;
  int age = 0;  // mother's divisions completed before this cycle
};

struct Occupant {
  bool initial = false;    // present at frame 0 (no arrival event)
  double tStart = 0.0;     // arrival; 0 for initial occupants
  double tEnd = kNever;    // leaves the trap (alive: washout; dead: corpse flushed)
  bool washedOut = false;  // left alive
  double tDeath = kNever;  // budding stops and morphology begins to change
  int lifespan = 0;        // divisions she would complete (drawn from the Gompertz law)
  double radiusUm = 2.2;   // when young
  bool lyses = false;      // corpse turns into a ghost
  double tLysis = kNever;
  std::uint64_t seed = 0;  // texture and wobble
  std::vector<Division> divisions;
};

struct StuckCell {
  double tStart = 0.0;
  double tEnd = 0.0;
  double angle = 0.0;  // trap frame, around the upstream direction
  double radiusUm = 2.0;
  std::uint64_t seed = 0;
};

struct TrapLife {
  std::vector<Occupant> occupants;
  std::vector<StuckCell> stuck;
};

// Where a separated daughter sits at time t (>= tSep), relative to the centre of
// a mother of radius motherRadiusUm, in the trap frame: carried away from the
// mother (round her if she budded upstream) or lodged beside her. The one
// definition that the renderer draws and the bud-site rule below respects.
struct DaughterPlace {
  double angle = 0.0;   // radians, 0 = downstream
  double distUm = 0.0;  // centre to the mother's centre
};
DaughterPlace daughterPlace(const Division& d, double motherRadiusUm, double t);

// True when a bud of final radius budRadiusUm growing from the mother in
// direction budAngle would overlap a daughter of `other` still in view at time
// t. Cells in a trap lie in one layer: a bud cannot grow where a cell sits.
bool budSiteTaken(double budAngle, double budRadiusUm, const Division& other, double motherRadiusUm,
                  double t);

// First frame whose time k·interval is >= t (the frame at which something that
// happens at time t is first visible).
int frameAt(double tMin, double intervalMin);

// Number of divisions drawn from the discrete Gompertz law: continuous T with
// hazard b·e^(a·t), S(T) = exp(-(b/a)(e^(aT) - 1)), b solved so S(median) = 1/2,
// rounded to the nearest integer so that the median of the count is the median.
int sampleLifespan(Rng& rng, double median, double shape);

// Mean and actual interval of cycle `n` (0-based) of a mother who completes
// `lifespan` divisions; cycle `lifespan` is the terminal one.
double meanCycleMin(const BiologyParams& b, int n, int lifespan);

TrapLife simulateTrap(const BiologyParams& b, int frames, double intervalMin, double cupRadiusUm,
                      Rng rng);

}  // namespace budledger::demo
