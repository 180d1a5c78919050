#include "core/traps/traps_csv.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <fstream>
#include <map>
#include <set>

#include "core/base/error.h"

namespace budledger::traps {
namespace {

std::vector<std::string> splitCsv(const std::string& line) {
  std::vector<std::string> out;
  std::string cell;
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted) {
      if (c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
        cell += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        cell += c;
      }
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      out.push_back(cell);
      cell.clear();
    } else if (c != '\r') {
      cell += c;
    }
  }
  out.push_back(cell);
  for (auto& s : out) {
    const auto b = s.find_first_not_of(" \t");
    const auto e = s.find_last_not_of(" \t");
    s = b == std::string::npos ? std::string() : s.substr(b, e - b + 1);
  }
  return out;
}

std::optional<double> parseNumber(const std::string& s) {
  double v = 0;
  const auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  if (ec != std::errc() || p != s.data() + s.size() || !std::isfinite(v)) return std::nullopt;
  return v;
}

}  // namespace

std::vector<SuppliedTrap> readTrapsCsv(const std::filesystem::path& file) {
  const std::string name = file.string();
  std::ifstream in(file);
  if (!in) throw InputError(name, std::nullopt, "cannot open trap layout (file not found?)");
  std::string line;
  long lineNo = 0;
  std::map<std::string, size_t> column;
  while (std::getline(in, line)) {
    ++lineNo;
    if (line.find_first_not_of(" \t\r") == std::string::npos) continue;
    const auto cells = splitCsv(line);
    for (size_t i = 0; i < cells.size(); ++i) {
      std::string key = cells[i];
      std::transform(key.begin(), key.end(), key.begin(),
                     [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
      column[key] = i;
    }
    break;
  }
  if (!column.count("x") || !column.count("y"))
    throw InputError(name, std::nullopt,
                     "line 1: a trap layout needs a header with columns x and y (optional: "
                     "position, trap_id, row, col, edge)");
  std::vector<SuppliedTrap> out;
  while (std::getline(in, line)) {
    ++lineNo;
    if (line.find_first_not_of(" \t\r") == std::string::npos) continue;
    const auto cells = splitCsv(line);
    auto cell = [&](const char* key) -> const std::string* {
      const auto it = column.find(key);
      if (it == column.end() || it->second >= cells.size()) return nullptr;
      return &cells[it->second];
    };
    auto bad = [&](const std::string& what) {
      throw InputError(name, std::nullopt, fmt::format("line {}: {}", lineNo, what));
    };
    SuppliedTrap t;
    t.line = lineNo;
    const auto x = cell("x") ? parseNumber(*cell("x")) : std::nullopt;
    const auto y = cell("y") ? parseNumber(*cell("y")) : std::nullopt;
    if (!x || !y) bad("x and y must be numbers");
    t.centre = {*x, *y};
    if (const auto* p = cell("position")) t.position = *p;
    for (const auto& [key, target] :
         {std::pair{"trap_id", &t.id}, std::pair{"row", &t.row}, std::pair{"col", &t.col}}) {
      const auto* c = cell(key);
      if (!c || c->empty()) continue;
      const auto v = parseNumber(*c);
      if (!v || *v < 0 || *v != std::floor(*v))
        bad(fmt::format("{} must be a whole number >= 0", key));
      *target = static_cast<int>(*v);
    }
    out.push_back(t);
  }
  if (out.empty()) throw InputError(name, std::nullopt, "the trap layout lists no traps");
  return out;
}

TrapLayout layoutFromSupplied(const std::vector<SuppliedTrap>& rows, const std::string& position,
                              const std::filesystem::path& file, const TrapLayout* detected) {
  std::vector<const SuppliedTrap*> mine;
  for (const auto& r : rows)
    if (r.position.empty() || r.position == position) mine.push_back(&r);
  if (mine.empty())
    throw InputError(file.string(), std::nullopt,
                     fmt::format("the trap layout has no rows for position '{}'", position));
  TrapLayout layout;
  layout.source = TrapLayout::Source::Supplied;
  const bool numbered = std::all_of(
      mine.begin(), mine.end(), [](const SuppliedTrap* t) { return t->id && t->row && t->col; });
  std::set<int> ids;
  for (const auto* r : mine) {
    Trap t;
    t.centre = r->centre;
    if (numbered) {
      if (!ids.insert(*r->id).second)
        throw InputError(file.string(), std::nullopt,
                         fmt::format("line {}: trap_id {} appears twice for position '{}'", r->line,
                                     *r->id, position));
      t.id = *r->id;
      t.row = *r->row;
      t.col = *r->col;
    }
    layout.traps.push_back(t);
  }
  if (numbered) {
    std::sort(layout.traps.begin(), layout.traps.end(),
              [](const Trap& a, const Trap& b) { return a.id < b.id; });
  } else {
    numberTraps(layout.traps, std::nullopt);
  }
  // Spacing of the centres sets the crop when no lattice is known.
  double spacing = 0;
  if (layout.traps.size() >= 2) {
    std::vector<double> nearest;
    for (const auto& a : layout.traps) {
      double best = 1e18;
      for (const auto& b : layout.traps)
        if (&a != &b) best = std::min(best, cv::norm(a.centre - b.centre));
      nearest.push_back(best);
    }
    std::nth_element(nearest.begin(), nearest.begin() + static_cast<long>(nearest.size() / 2),
                     nearest.end());
    spacing = nearest[nearest.size() / 2];
  }
  if (detected && !detected->traps.empty()) {
    layout.lattice = detected->lattice;
    layout.support = detected->support;
    layout.crop = detected->crop;
    layout.templ = detected->templ;
  } else {
    const double p = spacing > 0 ? spacing : 64.0;
    layout.support = cv::Rect2d(-0.35 * p, -0.35 * p, 0.7 * p, 0.7 * p);
    layout.crop = cropBox(layout.support, std::nullopt);
  }
  return layout;
}

}  // namespace budledger::traps
