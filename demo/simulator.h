#pragma once
// budledger::demo — the synthetic experiment generator. simulateExperiment()
// writes, for every position of a scenario, a multi-page 16-bit OME-TIFF and
// its ground truth (traps, events, lifespans, drift), plus positions.csv and
// the scenario as used; see docs/simulator.md for the model and the layout:
//   DIR/<position>.ome.tif
//   DIR/positions.csv                  position,group,file,frames,interval_min,pixel_um
//   DIR/truth/<position>/traps.csv     trap_id,row,col,x,y
//   DIR/truth/<position>/events.csv    trap_id,mother_id,frame,kind
//   DIR/truth/<position>/lifespans.csv trap_id,mother_id,first_frame,last_frame,divisions,outcome
//   DIR/truth/<position>/drift.csv     frame,dx,dy
//   DIR/scenario.json
// Same scenario (and seed) → byte-identical files on every machine.
#include <cstdint>
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include "core/base/progress.h"
#include "demo/biology.h"
#include "demo/device.h"
#include "demo/scenario.h"
#include "demo/truth.h"

namespace budledger::demo {

struct SimulateOptions {
  int jobs = 1;  // positions generated in parallel
  Progress progress;
  bool writeImages = true;  // false: truth only (fast, for statistics)
};

// Everything about one position except its pixels.
struct PositionModel {
  PositionSpec spec;
  Device device;
  std::vector<TrapLife> lives;
  PositionTruth truth;
};

PositionModel modelPosition(const Scenario& s, const PositionSpec& spec);

// Calls `frameSink(frame, pixels)` for each rendered frame (w×h, row-major);
// returns the true drift per frame.
using FrameSink = std::function<void(int frame, const std::vector<std::uint16_t>& pixels)>;
std::vector<Vec2> renderPosition(const Scenario& s, const PositionModel& model,
                                 const FrameSink& frameSink);

void simulateExperiment(const Scenario& s, const std::filesystem::path& outDir,
                        const SimulateOptions& options = {});

}  // namespace budledger::demo
