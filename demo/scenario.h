#pragma once
// Scenario: everything that defines a simulated experiment, with every
// parameter's physical meaning, unit, default and the source of the default
// declared once, in the visit*() functions of scenario.cpp. Reading, writing
// (scenario.json "as used", defaults filled in) and the parameter table of
// docs/simulator.md all walk that one list, so they cannot drift apart.
// Invariant after loadScenario(): every value is within its documented range
// and at least one group with at least one position exists.
#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

namespace budledger::demo {

// The chip: a lattice of cup-shaped traps made of posts.
struct DeviceParams {
  int rows = 6;
  int cols = 7;
  double pitchXUm = 18.0;
  double pitchYUm = 20.0;
  double stagger = 0.0;  // odd rows shifted by this fraction of pitchX
  double pixelUm = 0.25;
  std::string flow = "down";      // down | up | left | right (direction the medium moves)
  std::string postShape = "arc";  // arc | pillars | block
  double inletUm = 6.0;
  double outletUm = 3.0;
  double cupDepthUm = 4.0;
  double wallUm = 2.0;
  double heightUm = 5.0;
  double postEdgeUm = 0.3;
  double postJitterUm = 0.06;
  double marginUm = 10.0;
  int widthPx = 0;  // 0: fit the lattice plus margins
  int heightPx = 0;
};

// The cells of one strain/condition.
struct BiologyParams {
  double medianRls = 25.0;
  double gompertzShape = 0.12;
  double cycleMin = 90.0;
  double cycleCv = 0.15;
  double ageSlowdown = 0.004;
  int lateDivisions = 4;
  double lateSlowdown = 1.5;
  double g1Fraction = 0.2;
  double firstCycleFactor = 1.25;
  double motherDiameterUm = 4.4;
  double volumeGrowth = 0.045;
  double daughterRatio = 0.78;
  double budVisibleUm = 1.0;
  double upstreamBudFraction = 0.15;
  double lingerMin = 5.0;
  double lodgeProbability = 0.03;
  double lodgeMin = 150.0;
  double stuckPerHour = 0.02;
  double stuckMin = 120.0;
  double finalBudProbability = 0.5;
  double deathEnlarge = 0.15;
  double corpseStayProbability = 0.85;
  double corpseFlushMin = 600.0;
  double washoutPerHour = 0.006;
  double arrivalPerHour = 0.08;
  double initialOccupancy = 0.88;
  double driftersPerFrame = 0.3;
};

// Brightfield image formation and camera; each artefact has a strength, 0 = off.
struct OpticsParams {
  std::string polarity = "dark-rim";  // dark-rim | bright-rim
  double focusContrast = 1.0;
  double halo = 0.3;
  double edgeDarkening = 1.0;
  double psfUm = 0.3;
  double cellIndex = 1.0;
  double postIndex = 1.0;
  double illumination = 0.15;
  double backgroundElectrons = 4000.0;
  double readNoiseElectrons = 1.6;
  double aduPerElectron = 3.0;
  double offsetAdu = 100.0;
  double noise = 1.0;
  double flicker = 0.01;
  double defocusRate = 0.01;
  double defocus = 1.0;
  double drift = 0.12;
  double driftSmoothness = 0.9;
  double jumpRate = 0.005;
  double jumpPx = 12.0;
  double dust = 1.0;
  double debris = 1.0;
};

struct GroupSpec {
  std::string name = "group";
  int positions = 1;
  BiologyParams biology;
};

struct Scenario {
  std::string name = "scenario";
  std::uint64_t seed = 1;
  int frames = 216;
  double intervalMin = 10.0;
  std::string compression = "none";  // none | deflate | lzw
  DeviceParams device;
  OpticsParams optics;
  BiologyParams biology;  // defaults for every group; a group overrides what it names
  std::vector<GroupSpec> groups;
};

// One field of view as generated: name "<group>-p<k>", k from 1.
struct PositionSpec {
  std::string name;
  std::string group;
  int groupIndex = 0;
  int index = 0;  // 0-based over the whole scenario, fixes the position's random stream
};
std::vector<PositionSpec> positionsOf(const Scenario& s);

// Throws InputError naming the file and the key for unreadable JSON, unknown
// keys, wrong types and values out of range.
Scenario loadScenario(const std::filesystem::path& file);
Scenario scenarioFromJsonText(const std::string& text, const std::string& sourceName);
std::string scenarioToJsonText(const Scenario& s);
void validate(const Scenario& s, const std::string& sourceName);

// Difficulty presets for `simulate --seed`: easy (clean optics, no jumps),
// normal (the defaults), hard (strong artefacts, optics and trap geometry
// varied from the seed).
enum class Difficulty { Easy, Normal, Hard };
Scenario presetScenario(std::uint64_t seed, Difficulty difficulty);

// Markdown table of every parameter: key, default, unit, meaning and source.
std::string parameterTableMarkdown();

}  // namespace budledger::demo
