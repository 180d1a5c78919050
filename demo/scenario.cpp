#include "demo/scenario.h"

#include <fmt/format.h>

#include <fstream>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>

#include "core/base/error.h"
#include "demo/rng.h"

namespace budledger::demo {
namespace {

using nlohmann::json;

// The one list of parameters. `V` is a reader, writer or documenter; each call names
// the JSON key, the field, its range, its unit and what it means, with the source of
// the default.
template <class V>
void visitDevice(DeviceParams& p, V& v) {
  v.num("rows", p.rows, 1, 60, "", "trap rows (stacked along y)", "choice of experiment");
  v.num("cols", p.cols, 1, 60, "", "trap columns (along x)", "choice of experiment");
  v.num("pitch_x_um", p.pitchXUm, 10.0, 80.0, "µm", "centre-to-centre trap distance along x",
        "common practice for cup arrays (15–30 µm), from memory");
  v.num("pitch_y_um", p.pitchYUm, 10.0, 80.0, "µm", "centre-to-centre trap distance along y",
        "common practice, from memory");
  v.num("stagger", p.stagger, 0.0, 1.0, "pitch", "shift of odd rows along x, fraction of pitch_x",
        "0 = square lattice; staggered designs use 0.5");
  v.num("pixel_um", p.pixelUm, 0.1, 0.5, "µm/px", "object-side pixel size",
        "6.5 µm sCMOS pixel behind a 25× path ≈ 0.26 µm (common practice)");
  v.choice("flow", p.flow, {"down", "up", "left", "right"},
           "direction in which the medium moves across the image", "device convention");
  v.choice("post_shape", p.postShape, {"arc", "pillars", "block"},
           "posts forming each cup: one curved wall per side, round pillars, or square blocks",
           "variants found in published trap designs (from memory)");
  v.num("inlet_um", p.inletUm, 3.0, 12.0, "µm", "width of the cup's upstream opening",
        "seed document: inlet ≈ 6 µm");
  v.num("outlet_um", p.outletUm, 1.0, 5.0, "µm", "gap between the posts at the cup's bottom",
        "seed document: outlet ≈ 3 µm, narrower than a mother");
  v.num("cup_depth_um", p.cupDepthUm, 2.0, 10.0, "µm", "distance from outlet lips to inlet line",
        "chosen so a young mother sits mostly inside (from memory)");
  v.num("wall_um", p.wallUm, 0.8, 6.0, "µm", "thickness of the post walls",
        "common practice for PDMS posts (from memory)");
  v.num("height_um", p.heightUm, 2.0, 10.0, "µm",
        "channel/trap height (optical path through posts)", "seed document: traps ≈ 5 µm high");
  v.num("post_edge_um", p.postEdgeUm, 0.05, 1.5, "µm", "width over which a post's side wall slopes",
        "soft-lithography sidewalls are not vertical (from memory)");
  v.num("post_jitter_um", p.postJitterUm, 0.0, 0.5, "µm",
        "random fabrication error of post positions", "from memory");
  v.num("margin_um", p.marginUm, 0.0, 50.0, "µm", "empty channel around the lattice",
        "choice of field of view");
  v.num("width_px", p.widthPx, 0, 8192, "px", "image width (0 = fit lattice plus margins)", "—");
  v.num("height_px", p.heightPx, 0, 8192, "px", "image height (0 = fit lattice plus margins)", "—");
}

template <class V>
void visitBiology(BiologyParams& p, V& v) {
  v.num("median_rls", p.medianRls, 1.0, 200.0, "divisions",
        "median replicative lifespan (divisions in the trap) the Gompertz hazard is solved for",
        "wild type ≈ 25: Huberts et al. 2014 meta-analysis, mean ≈ 26");
  v.num("gompertz_shape", p.gompertzShape, 0.005, 1.0, "1/division",
        "rate a of the per-division hazard b·e^(a·n); larger = lifespans less spread",
        "0.1–0.15 fits wild-type RLS curves (from memory)");
  v.num("cycle_min", p.cycleMin, 30.0, 600.0, "min", "mean division interval of a young mother",
        "≈ 90 min in rich medium at 30 °C (Sherman 2002; common practice)");
  v.num("cycle_cv", p.cycleCv, 0.0, 1.0, "", "coefficient of variation of intervals (gamma)",
        "10–20% cell-to-cell (from memory)");
  v.num("age_slowdown", p.ageSlowdown, 0.0, 0.1, "1/division",
        "fractional lengthening of the interval per division of age", "from memory");
  v.num("late_divisions", p.lateDivisions, 0, 20, "divisions",
        "number of final divisions over which intervals lengthen",
        "Fehrmann et al. 2013: lengthening over the last few divisions");
  v.num("late_slowdown", p.lateSlowdown, 0.0, 10.0, "",
        "extra length of the very last interval, as a fraction (rises quadratically)",
        "Fehrmann et al. 2013 (last cycles roughly 2× longer; from memory)");
  v.num("g1_fraction", p.g1Fraction, 0.05, 0.6, "", "unbudded part of a mother's cycle",
        "mothers have a short G1, ≈ 20% (from memory)");
  v.num("first_cycle_factor", p.firstCycleFactor, 1.0, 3.0, "",
        "length of a newborn daughter's first cycle relative to a mother's",
        "daughters have a longer first G1 (common practice)");
  v.num("mother_diameter_um", p.motherDiameterUm, 2.5, 7.0, "µm", "diameter of a young mother",
        "haploid ≈ 4 µm, diploid ≈ 6 µm (common practice)");
  v.num("volume_growth", p.volumeGrowth, 0.0, 0.3, "1/division",
        "mother volume increase per division, relative to young volume",
        "old mothers reach ≈ 2× young volume (common practice)");
  v.num("daughter_ratio", p.daughterRatio, 0.4, 1.0, "",
        "daughter diameter at separation / mother's", "asymmetric division (common practice)");
  v.num("bud_visible_um", p.budVisibleUm, 0.3, 2.5, "µm",
        "bud diameter at the moment it is counted as emerged", "about 4 px at 0.25 µm/px (choice)");
  v.num("upstream_bud_fraction", p.upstreamBudFraction, 0.0, 1.0, "",
        "share of buds that emerge on the upstream side, against the flow", "from memory");
  v.num("linger_min", p.lingerMin, 0.0, 120.0, "min",
        "mean time a separated daughter stays in view before the flow takes it",
        "daughters leave within a frame or two (seed document)");
  v.num("lodge_probability", p.lodgeProbability, 0.0, 1.0, "",
        "chance that a daughter lodges beside the mother instead (crowding)", "from memory");
  v.num("lodge_min", p.lodgeMin, 1.0, 2000.0, "min", "mean time a lodged daughter stays",
        "from memory");
  v.num("stuck_per_hour", p.stuckPerHour, 0.0, 2.0, "1/h",
        "rate at which a passing cell gets stuck on an occupied trap", "from memory");
  v.num("stuck_min", p.stuckMin, 1.0, 2000.0, "min", "mean time a stuck cell stays", "from memory");
  v.num("final_bud_probability", p.finalBudProbability, 0.0, 1.0, "",
        "chance that a dying mother arrests with a last bud that never separates",
        "old mothers often die large-budded (from memory)");
  v.num("death_enlarge", p.deathEnlarge, 0.0, 0.6, "",
        "relative diameter increase of a dead mother over the hours after death", "from memory");
  v.num("corpse_stay_probability", p.corpseStayProbability, 0.0, 1.0, "",
        "chance a dead mother stays in the cup to the end",
        "dead cells usually stay (seed document)");
  v.num("corpse_flush_min", p.corpseFlushMin, 1.0, 10000.0, "min",
        "mean time before a corpse that does leave is flushed out", "from memory");
  v.num("washout_per_hour", p.washoutPerHour, 0.0, 1.0, "1/h",
        "hazard of a live mother being flushed out (right-censoring)",
        "10–30% of mothers lost over two days (from memory)");
  v.num("arrival_per_hour", p.arrivalPerHour, 0.0, 10.0, "1/h",
        "rate at which an empty trap captures a new mother", "from memory");
  v.num("initial_occupancy", p.initialOccupancy, 0.0, 1.0, "",
        "share of traps holding a mother at the first frame",
        "loading fills most traps (from memory)");
  v.num("drifters_per_frame", p.driftersPerFrame, 0.0, 20.0, "1/frame",
        "mean number of cells passing through the field of view per frame", "from memory");
}

template <class V>
void visitOptics(OpticsParams& p, V& v) {
  v.choice("polarity", p.polarity, {"dark-rim", "bright-rim"},
           "focus side: dark cell rims with bright interiors, or bright rims with dark interiors",
           "both are used in practice (focus slightly below or above the cells)");
  v.num("focus_contrast", p.focusContrast, 0.0, 5.0, "",
        "strength of the defocus (transport-of-intensity) term that draws rims", "tuned by eye");
  v.num("halo", p.halo, 0.0, 5.0, "", "strength of the wide bright/dark halo around cells",
        "tuned by eye");
  v.num("edge_darkening", p.edgeDarkening, 0.0, 5.0, "",
        "loss of light where steep edges refract it out of the objective's aperture",
        "tuned by eye");
  v.num("psf_um", p.psfUm, 0.05, 2.0, "µm", "Gaussian sigma of the in-focus point spread",
        "≈ 0.21·λ/NA for λ 0.6 µm, NA 0.45 (common practice)");
  v.num("cell_index", p.cellIndex, 0.0, 5.0, "", "optical contrast of cells (relative)",
        "cytoplasm n ≈ 1.38 vs medium 1.33 (from memory)");
  v.num("post_index", p.postIndex, 0.0, 5.0, "", "optical contrast of posts (relative)",
        "PDMS n ≈ 1.41 (common practice)");
  v.num("illumination", p.illumination, 0.0, 0.8, "",
        "uneven illumination: relative fall-off towards the corners and one-sided gradient",
        "Köhler illumination is never perfectly flat (from memory)");
  v.num("background_electrons", p.backgroundElectrons, 10.0, 1e6, "e⁻",
        "photo-electrons per pixel in empty channel", "a well-exposed sCMOS frame (from memory)");
  v.num("read_noise_electrons", p.readNoiseElectrons, 0.0, 50.0, "e⁻", "camera read noise",
        "sCMOS ≈ 1–2 e⁻ rms (common practice)");
  v.num("adu_per_electron", p.aduPerElectron, 0.01, 100.0, "ADU/e⁻", "camera gain", "from memory");
  v.num("offset_adu", p.offsetAdu, 0.0, 5000.0, "ADU", "camera black level",
        "common practice (100)");
  v.num("noise", p.noise, 0.0, 10.0, "", "scale on shot and read noise (0 = noiseless)",
        "1 = physical");
  v.num("flicker", p.flicker, 0.0, 0.3, "", "sd of frame-to-frame lamp brightness",
        "≈ 1% for LED/halogen (from memory)");
  v.num("defocus_rate", p.defocusRate, 0.0, 0.5, "1/frame", "share of frames taken out of focus",
        "autofocus misses (from memory)");
  v.num("defocus", p.defocus, 0.0, 5.0, "", "how far out of focus such frames are (relative)",
        "tuned by eye");
  v.num("drift", p.drift, 0.0, 5.0, "px/frame", "sd of the stage-drift velocity innovations",
        "thermal drift of a few µm over hours (from memory)");
  v.num("drift_smoothness", p.driftSmoothness, 0.0, 0.999, "",
        "persistence of the drift velocity from frame to frame", "from memory");
  v.num("jump_rate", p.jumpRate, 0.0, 0.5, "1/frame", "chance of a sudden stage jump per frame",
        "stage re-positioning errors (from memory)");
  v.num("jump_px", p.jumpPx, 0.0, 100.0, "px", "typical size of a jump", "from memory");
  v.num("dust", p.dust, 0.0, 10.0, "", "amount of out-of-focus dust fixed on the camera",
        "from memory");
  v.num("debris", p.debris, 0.0, 10.0, "",
        "amount of debris and surface roughness on the chip (moves with the stage)", "from memory");
}

template <class V>
void visitTop(Scenario& s, V& v) {
  v.str("name", s.name, "name of the experiment", "—");
  v.num("seed", s.seed, std::uint64_t{0}, UINT64_MAX, "", "seed of every random stream", "—");
  v.num("frames", s.frames, 1, 100000, "", "frames per position", "choice of experiment");
  v.num("interval_min", s.intervalMin, 0.5, 120.0, "min", "time between frames",
        "seed document: one frame every 10 minutes");
  v.choice("compression", s.compression, {"none", "deflate", "lzw"},
           "TIFF compression of the stacks", "none is fastest to write and read");
}

// ---- reader -----------------------------------------------------------------
class Reader {
 public:
  Reader(const json& j, std::string source, std::string prefix)
      : j_(j), source_(std::move(source)), prefix_(std::move(prefix)) {
    if (!j_.is_object()) fail(prefix_.empty() ? "top level" : prefix_, "expected an object");
  }

  template <class T>
  void num(const char* key, T& field, T lo, T hi, const char*, const char*, const char*) {
    seen_.insert(key);
    auto it = j_.find(key);
    if (it == j_.end()) return;
    if (!it->is_number()) fail(key, "expected a number");
    if constexpr (std::is_integral_v<T>) {
      if (!it->is_number_integer() && !it->is_number_unsigned()) fail(key, "expected an integer");
      if constexpr (std::is_unsigned_v<T>) {
        if (it->is_number_integer() && it->get<std::int64_t>() < 0)
          fail(key, "must not be negative");
      }
    }
    const T value = it->get<T>();
    if (!(value >= lo && value <= hi))
      fail(key, fmt::format("{} is outside the range {} to {}", value, lo, hi));
    field = value;
  }

  void choice(const char* key, std::string& field, std::initializer_list<const char*> allowed,
              const char*, const char*) {
    seen_.insert(key);
    auto it = j_.find(key);
    if (it == j_.end()) return;
    if (!it->is_string()) fail(key, "expected a string");
    const auto value = it->get<std::string>();
    std::string list;
    for (const char* a : allowed) {
      if (value == a) {
        field = value;
        return;
      }
      list += list.empty() ? a : fmt::format(", {}", a);
    }
    fail(key, fmt::format("'{}' is not one of {}", value, list));
  }

  void str(const char* key, std::string& field, const char*, const char*) {
    seen_.insert(key);
    auto it = j_.find(key);
    if (it == j_.end()) return;
    if (!it->is_string()) fail(key, "expected a string");
    field = it->get<std::string>();
  }

  void allow(const char* key) { seen_.insert(key); }

  void rejectUnknown() const {
    for (auto it = j_.begin(); it != j_.end(); ++it)
      if (!seen_.count(it.key())) fail(it.key(), "unknown key");
  }

  [[noreturn]] void fail(const std::string& key, const std::string& what) const {
    throw InputError(source_, std::nullopt, fmt::format("{}{}: {}", prefix_, key, what));
  }

 private:
  const json& j_;
  std::string source_;
  std::string prefix_;
  std::set<std::string> seen_;
};

// ---- writer -----------------------------------------------------------------
class Writer {
 public:
  explicit Writer(json& j) : j_(j) {}
  template <class T>
  void num(const char* key, T& field, T, T, const char*, const char*, const char*) {
    j_[key] = field;
  }
  void choice(const char* key, std::string& field, std::initializer_list<const char*>, const char*,
              const char*) {
    j_[key] = field;
  }
  void str(const char* key, std::string& field, const char*, const char*) { j_[key] = field; }

 private:
  json& j_;
};

// ---- documenter -------------------------------------------------------------
class Documenter {
 public:
  explicit Documenter(std::string section) : section_(std::move(section)) {}
  template <class T>
  void num(const char* key, T& field, T lo, T hi, const char* unit, const char* meaning,
           const char* source) {
    row(key, fmt::format("{}", field), fmt::format("{} … {}", lo, hi), unit, meaning, source);
  }
  void choice(const char* key, std::string& field, std::initializer_list<const char*> allowed,
              const char* meaning, const char* source) {
    std::string list;
    for (const char* a : allowed) list += list.empty() ? a : fmt::format(" \\| {}", a);
    row(key, field, list, "", meaning, source);
  }
  void str(const char* key, std::string& field, const char* meaning, const char* source) {
    row(key, field, "text", "", meaning, source);
  }
  std::string text;

 private:
  void row(const char* key, const std::string& def, const std::string& range, const char* unit,
           const char* meaning, const char* source) {
    text += fmt::format("| `{}{}` | {} | {} | {} | {} | {} |\n", section_, key, def, range, unit,
                        meaning, source);
  }
  std::string section_;
};

void readGroup(const json& j, const std::string& source, int index, const BiologyParams& defaults,
               GroupSpec& g) {
  Reader r(j, source, fmt::format("groups[{}].", index));
  g.biology = defaults;
  r.str("name", g.name, "", "");
  r.num("positions", g.positions, 1, 1000, "", "", "");
  r.allow("biology");
  r.rejectUnknown();
  if (auto it = j.find("biology"); it != j.end()) {
    Reader b(*it, source, fmt::format("groups[{}].biology.", index));
    visitBiology(g.biology, b);
    b.rejectUnknown();
  }
}

}  // namespace

std::vector<PositionSpec> positionsOf(const Scenario& s) {
  std::vector<PositionSpec> out;
  int index = 0;
  for (std::size_t g = 0; g < s.groups.size(); ++g)
    for (int k = 1; k <= s.groups[g].positions; ++k)
      out.push_back({fmt::format("{}-p{}", s.groups[g].name, k), s.groups[g].name,
                     static_cast<int>(g), index++});
  return out;
}

Scenario scenarioFromJsonText(const std::string& text, const std::string& sourceName) {
  json j;
  try {
    j = json::parse(text);
  } catch (const json::parse_error& e) {
    throw InputError(sourceName, std::nullopt, fmt::format("not valid JSON: {}", e.what()));
  }
  Scenario s;
  Reader top(j, sourceName, "");
  visitTop(s, top);
  for (const char* section : {"device", "optics", "biology", "groups"}) top.allow(section);
  top.rejectUnknown();
  if (auto it = j.find("device"); it != j.end()) {
    Reader r(*it, sourceName, "device.");
    visitDevice(s.device, r);
    r.rejectUnknown();
  }
  if (auto it = j.find("optics"); it != j.end()) {
    Reader r(*it, sourceName, "optics.");
    visitOptics(s.optics, r);
    r.rejectUnknown();
  }
  if (auto it = j.find("biology"); it != j.end()) {
    Reader r(*it, sourceName, "biology.");
    visitBiology(s.biology, r);
    r.rejectUnknown();
  }
  if (auto it = j.find("groups"); it != j.end()) {
    if (!it->is_array()) top.fail("groups", "expected an array");
    int i = 0;
    for (const auto& gj : *it) {
      GroupSpec g;
      readGroup(gj, sourceName, i++, s.biology, g);
      s.groups.push_back(std::move(g));
    }
  } else {
    s.groups.push_back(GroupSpec{"sim", 1, s.biology});
  }
  validate(s, sourceName);
  return s;
}

void validate(const Scenario& s, const std::string& sourceName) {
  if (s.groups.empty())
    throw InputError(sourceName, std::nullopt, "groups: at least one group is needed");
  std::set<std::string> names;
  for (std::size_t i = 0; i < s.groups.size(); ++i) {
    const auto& name = s.groups[i].name;
    const bool ok = !name.empty() && name.find_first_not_of(
                                         "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ"
                                         "0123456789_-") == std::string::npos;
    if (!ok)
      throw InputError(
          sourceName, std::nullopt,
          fmt::format("groups[{}].name: '{}' must be letters, digits, - or _", i, name));
    if (!names.insert(name).second)
      throw InputError(sourceName, std::nullopt,
                       fmt::format("groups[{}].name: '{}' is used twice", i, name));
  }
  const auto& d = s.device;
  const auto fail = [&](const std::string& what) {
    throw InputError(sourceName, std::nullopt, what);
  };
  if (d.inletUm <= d.outletUm) fail("device.inlet_um must be wider than device.outlet_um");
  for (std::size_t i = 0; i < s.groups.size(); ++i) {
    const double diameter = s.groups[i].biology.motherDiameterUm;
    // A mother narrower than the outlet would pass straight through the cup.
    if (diameter <= d.outletUm + 0.2)
      fail(fmt::format("groups[{}]: mother_diameter_um {} does not hold in an outlet of {} µm", i,
                       diameter, d.outletUm));
    if (diameter >= d.inletUm + 1.0)
      fail(fmt::format("groups[{}]: mother_diameter_um {} does not enter an inlet of {} µm", i,
                       diameter, d.inletUm));
  }
  // Pitches across and along the flow must leave room for a cup and for buds.
  const bool vertical = d.flow == "down" || d.flow == "up";
  const double across = vertical ? d.pitchXUm : d.pitchYUm;
  const double along = vertical ? d.pitchYUm : d.pitchXUm;
  const double trapSpan = d.inletUm + 2.0 * d.wallUm + 2.0;
  if (across < trapSpan)
    fail(fmt::format("device.pitch_{}_um {} is narrower than a trap ({:.1f} µm)",
                     vertical ? "x" : "y", across, trapSpan));
  if (along < d.cupDepthUm + d.wallUm + 8.0)
    fail(fmt::format("device.pitch_{}_um {} leaves no room for buds between traps",
                     vertical ? "y" : "x", along));
}

Scenario loadScenario(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(file.string(), std::nullopt, "cannot be read");
  std::stringstream ss;
  ss << in.rdbuf();
  return scenarioFromJsonText(ss.str(), file.string());
}

std::string scenarioToJsonText(const Scenario& scenario) {
  Scenario s = scenario;
  json j;
  Writer top(j);
  visitTop(s, top);
  Writer dev(j["device"]);
  visitDevice(s.device, dev);
  Writer opt(j["optics"]);
  visitOptics(s.optics, opt);
  Writer bio(j["biology"]);
  visitBiology(s.biology, bio);
  j["groups"] = json::array();
  for (auto& g : s.groups) {
    json gj;
    gj["name"] = g.name;
    gj["positions"] = g.positions;
    Writer gb(gj["biology"]);
    visitBiology(g.biology, gb);
    j["groups"].push_back(gj);
  }
  return j.dump(2) + "\n";
}

std::string parameterTableMarkdown() {
  std::string out =
      "| key | default | range | unit | meaning | source of the default |\n"
      "|---|---|---|---|---|---|\n";
  Scenario s;
  Documenter top("");
  visitTop(s, top);
  Documenter dev("device.");
  visitDevice(s.device, dev);
  Documenter opt("optics.");
  visitOptics(s.optics, opt);
  Documenter bio("biology.");
  visitBiology(s.biology, bio);
  return out + top.text + dev.text + opt.text + bio.text;
}

Scenario presetScenario(std::uint64_t seed, Difficulty difficulty) {
  Scenario s;
  s.name = fmt::format("preset-{}", seed);
  s.seed = seed;
  s.frames = 216;
  auto& o = s.optics;
  switch (difficulty) {
    case Difficulty::Easy:
      o.noise = 0.5;
      o.flicker = 0.0;
      o.defocusRate = 0.0;
      o.jumpRate = 0.0;
      o.drift = 0.05;
      o.dust = 0.0;
      o.illumination = 0.05;
      s.biology.driftersPerFrame = 0.0;
      s.biology.stuckPerHour = 0.0;
      s.biology.lodgeProbability = 0.0;
      break;
    case Difficulty::Normal:
      break;
    case Difficulty::Hard: {
      // Vary what the engine must not be tuned to, from the seed.
      Rng r = Rng(seed).derive("preset-hard");
      o.noise = r.uniform(1.5, 3.0);
      o.flicker = r.uniform(0.02, 0.05);
      o.defocusRate = r.uniform(0.02, 0.06);
      o.defocus = r.uniform(1.0, 2.0);
      o.jumpRate = r.uniform(0.01, 0.03);
      o.jumpPx = r.uniform(10.0, 30.0);
      o.drift = r.uniform(0.15, 0.4);
      o.dust = r.uniform(1.0, 3.0);
      o.illumination = r.uniform(0.15, 0.35);
      o.polarity = r.bernoulli(0.5) ? "dark-rim" : "bright-rim";
      o.halo = r.uniform(0.1, 1.5);
      o.focusContrast = r.uniform(0.6, 1.6);
      o.backgroundElectrons = r.uniform(800.0, 3000.0);
      s.device.pixelUm = r.uniform(0.2, 0.35);
      const char* shapes[] = {"arc", "pillars", "block"};
      s.device.postShape = shapes[r.uniformInt(0, 2)];
      s.device.stagger = r.bernoulli(0.5) ? 0.5 : 0.0;
      s.device.pitchXUm = r.uniform(16.0, 24.0);
      s.device.pitchYUm = r.uniform(18.0, 26.0);
      s.biology.driftersPerFrame = r.uniform(0.5, 1.5);
      s.biology.stuckPerHour = r.uniform(0.03, 0.08);
      s.biology.lodgeProbability = r.uniform(0.05, 0.12);
      s.biology.upstreamBudFraction = r.uniform(0.15, 0.35);
      s.biology.lingerMin = r.uniform(5.0, 15.0);
      break;
    }
  }
  s.groups.push_back(GroupSpec{"sim", 1, s.biology});
  return s;
}

}  // namespace budledger::demo
