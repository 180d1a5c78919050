#include "core/evaluate/truth.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "core/base/error.h"

namespace budledger::evaluate {
namespace {

namespace fs = std::filesystem;

// A CSV file with a header row, read by column name (no quoting: the
// simulator writes plain fields).
class CsvTable {
 public:
  explicit CsvTable(const fs::path& path) : path_(path.string()) {
    std::ifstream in(path);
    if (!in) throw InputError(path_, std::nullopt, "cannot open file");
    std::string line;
    if (!std::getline(in, line)) throw InputError(path_, std::nullopt, "empty file, no header row");
    header_ = split(line);
    while (std::getline(in, line)) {
      if (!line.empty() && line.back() == '\r') line.pop_back();
      if (line.empty()) continue;
      rows_.push_back(split(line));
      if (rows_.back().size() != header_.size())
        throw InputError(path_, std::nullopt,
                         fmt::format("row {} has {} fields, the header has {}", rows_.size() + 1,
                                     rows_.back().size(), header_.size()));
    }
  }

  std::size_t size() const { return rows_.size(); }

  std::size_t column(const std::string& name) const {
    for (std::size_t i = 0; i < header_.size(); ++i)
      if (header_[i] == name) return i;
    throw InputError(path_, std::nullopt, fmt::format("no column '{}' in the header", name));
  }

  const std::string& text(std::size_t row, std::size_t col) const { return rows_[row][col]; }

  int integer(std::size_t row, std::size_t col) const {
    const std::string& s = rows_[row][col];
    int v = 0;
    const auto r = std::from_chars(s.data(), s.data() + s.size(), v);
    if (r.ec != std::errc() || r.ptr != s.data() + s.size()) fail(row, col, "an integer");
    return v;
  }

  double real(std::size_t row, std::size_t col) const {
    const std::string& s = rows_[row][col];
    try {
      std::size_t used = 0;
      const double v = std::stod(s, &used);
      if (used == s.size()) return v;
    } catch (const std::exception&) {
    }
    fail(row, col, "a number");
  }

  [[noreturn]] void fail(std::size_t row, std::size_t col, const std::string& expected) const {
    throw InputError(path_, std::nullopt,
                     fmt::format("row {}, column '{}': '{}' is not {}", row + 2, header_[col],
                                 rows_[row][col], expected));
  }

 private:
  static std::vector<std::string> split(std::string line) {
    if (!line.empty() && line.back() == '\r') line.pop_back();
    std::vector<std::string> out;
    std::stringstream ss(line);
    std::string field;
    while (std::getline(ss, field, ',')) out.push_back(field);
    if (!line.empty() && line.back() == ',') out.emplace_back();
    return out;
  }

  std::string path_;
  std::vector<std::string> header_;
  std::vector<std::vector<std::string>> rows_;
};

void readPositionTruth(const fs::path& dir, TruthPosition& p) {
  {
    const CsvTable t(dir / "traps.csv");
    const auto cTrap = t.column("trap_id"), cRow = t.column("row"), cCol = t.column("col"),
               cX = t.column("x"), cY = t.column("y");
    for (std::size_t r = 0; r < t.size(); ++r)
      p.traps.push_back(TruthTrap{t.integer(r, cTrap), t.integer(r, cRow), t.integer(r, cCol),
                                  t.real(r, cX), t.real(r, cY)});
  }
  {
    const CsvTable t(dir / "events.csv");
    const auto cTrap = t.column("trap_id"), cMother = t.column("mother_id"),
               cFrame = t.column("frame"), cKind = t.column("kind");
    for (std::size_t r = 0; r < t.size(); ++r) {
      const auto kind = eventKindFromString(t.text(r, cKind));
      if (!kind) t.fail(r, cKind, "an event kind (bud, separation, death, washout, arrival)");
      p.events.push_back(
          TruthEvent{t.integer(r, cTrap), t.integer(r, cMother), t.integer(r, cFrame), *kind});
    }
  }
  {
    const CsvTable t(dir / "lifespans.csv");
    const auto cTrap = t.column("trap_id"), cMother = t.column("mother_id"),
               cFirst = t.column("first_frame"), cLast = t.column("last_frame"),
               cDiv = t.column("divisions"), cOutcome = t.column("outcome");
    for (std::size_t r = 0; r < t.size(); ++r) {
      const std::string& outcome = t.text(r, cOutcome);
      if (outcome != "death" && outcome != "censored") t.fail(r, cOutcome, "death or censored");
      p.tenures.push_back(TruthTenure{t.integer(r, cTrap), t.integer(r, cMother),
                                      t.integer(r, cFirst), t.integer(r, cLast), t.integer(r, cDiv),
                                      outcome == "death"});
    }
  }
}

}  // namespace

Truth readTruth(const std::string& folder) {
  Truth truth;
  truth.folder = folder;
  const fs::path root(folder);
  const CsvTable positions(root / "positions.csv");
  const auto cName = positions.column("position"), cGroup = positions.column("group"),
             cFile = positions.column("file"), cFrames = positions.column("frames"),
             cInterval = positions.column("interval_min"), cPixel = positions.column("pixel_um");
  for (std::size_t r = 0; r < positions.size(); ++r) {
    TruthPosition p;
    p.name = positions.text(r, cName);
    p.group = positions.text(r, cGroup);
    p.file = positions.text(r, cFile);
    p.frames = positions.integer(r, cFrames);
    p.intervalMin = positions.real(r, cInterval);
    p.pixelUm = positions.real(r, cPixel);
    readPositionTruth(root / "truth" / p.name, p);
    truth.positions.push_back(std::move(p));
  }
  return truth;
}

std::vector<int> truthOccupancy(const TruthPosition& p, int trap) {
  std::vector<int> out(static_cast<std::size_t>(std::max(0, p.frames)), kTruthEmpty);
  auto set = [&](int from, int to, int value) {
    for (int t = std::max(0, from); t <= std::min(p.frames - 1, to); ++t)
      out[static_cast<std::size_t>(t)] = value;
  };
  for (const auto& t : p.tenures) {
    if (t.trap != trap) continue;
    set(t.firstFrame, t.lastFrame, kTruthSingle);
    // A corpse stays until the next tenure or a flush the truth does not record.
    if (t.died) {
      int until = p.frames - 1;
      for (const auto& n : p.tenures)
        if (n.trap == trap && n.firstFrame > t.lastFrame) until = std::min(until, n.firstFrame - 1);
      set(t.lastFrame, until, kTruthDead);
    }
  }
  std::vector<TruthEvent> events;
  for (const auto& e : p.events)
    if (e.trap == trap) events.push_back(e);
  std::sort(events.begin(), events.end(),
            [](const TruthEvent& a, const TruthEvent& b) { return a.frame < b.frame; });
  int budFrom = -1;
  for (const auto& e : events) {
    if (e.kind == EventKind::Bud) budFrom = e.frame;
    if (e.kind == EventKind::Separation) {
      // A bud present from before the first frame: budded from frame 0.
      const int from = budFrom >= 0 ? budFrom : 0;
      for (int t = from; t < e.frame && t < p.frames; ++t)
        if (out[static_cast<std::size_t>(t)] == kTruthSingle)
          out[static_cast<std::size_t>(t)] = kTruthBudded;
      budFrom = -1;
    }
    if (e.kind == EventKind::Death || e.kind == EventKind::Washout) budFrom = -1;
  }
  if (budFrom >= 0)
    for (int t = budFrom; t < p.frames && out[static_cast<std::size_t>(t)] == kTruthSingle; ++t)
      out[static_cast<std::size_t>(t)] = kTruthBudded;
  return out;
}

}  // namespace budledger::evaluate
