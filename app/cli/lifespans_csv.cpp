#include "app/cli/lifespans_csv.h"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <charconv>
#include <fstream>
#include <stdexcept>

#include "core/base/error.h"

namespace budledger::cli {

std::vector<std::string> splitCsvLine(const std::string& line) {
  std::vector<std::string> fields(1);
  bool quoted = false;
  for (std::size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted) {
      if (c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
        fields.back() += '"';
        ++i;
      } else if (c == '"') {
        quoted = false;
      } else {
        fields.back() += c;
      }
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      fields.emplace_back();
    } else {
      fields.back() += c;
    }
  }
  if (quoted) throw std::runtime_error("unterminated quoted field");
  return fields;
}

namespace {

std::string trim(std::string s) {
  const auto notSpace = [](unsigned char c) { return !std::isspace(c); };
  s.erase(s.begin(), std::find_if(s.begin(), s.end(), notSpace));
  s.erase(std::find_if(s.rbegin(), s.rend(), notSpace).base(), s.end());
  return s;
}

class Reader {
 public:
  explicit Reader(const std::string& path) : path_(path) {}

  [[noreturn]] void fail(long line, const std::string& what) const {
    throw InputError(path_, std::nullopt, fmt::format("line {}: {}", line, what));
  }
  [[noreturn]] void fail(const std::string& what) const {
    throw InputError(path_, std::nullopt, what);
  }

  std::size_t column(const std::vector<std::string>& header, const std::string& name) const {
    auto it = std::find(header.begin(), header.end(), name);
    if (it == header.end()) {
      fail(fmt::format("missing column '{}' (the header has: {})", name, fmt::join(header, ", ")));
    }
    return std::size_t(it - header.begin());
  }

  int divisions(long line, const std::string& text) const {
    const std::string where = fmt::format("column 'divisions': \"{}\"", text);
    if (text.empty()) fail(line, where + " is empty");
    long long v = 0;
    const char* end = text.data() + text.size();
    auto [ptr, ec] = std::from_chars(text.data(), end, v);
    if (ec == std::errc::result_out_of_range) fail(line, where + " is out of range");
    if (ec != std::errc() || ptr != end) {
      double d = 0;
      auto [p2, e2] = std::from_chars(text.data(), end, d);
      if (e2 == std::errc() && p2 == end) fail(line, where + " is not a whole number of divisions");
      fail(line, where + " is not a number");
    }
    if (v < 0) fail(line, where + " is negative");
    if (v > 1000000) fail(line, where + " is implausibly large");
    return int(v);
  }

 private:
  std::string path_;
};

}  // namespace

std::vector<stats::Lifespan> readLifespansCsv(const std::string& path,
                                              const LifespanCsvOptions& options) {
  Reader r(path);
  std::ifstream in(path, std::ios::binary);
  if (!in) r.fail("cannot open the file (does it exist?)");
  std::string text;
  long lineNo = 0;
  auto next = [&](std::string& out) {
    if (!std::getline(in, out)) return false;
    ++lineNo;
    if (!out.empty() && out.back() == '\r') out.pop_back();
    return true;
  };
  if (!next(text)) r.fail("the file is empty (expected a header line)");
  if (text.rfind("\xEF\xBB\xBF", 0) == 0) text.erase(0, 3);  // UTF-8 byte-order mark
  std::vector<std::string> header;
  try {
    header = splitCsvLine(text);
  } catch (const std::runtime_error& e) {
    r.fail(lineNo, e.what());
  }
  for (auto& h : header) h = trim(h);
  const std::size_t colDivisions = r.column(header, "divisions");
  const std::size_t colOutcome = r.column(header, "outcome");
  constexpr std::size_t kNone = std::size_t(-1);
  const std::size_t colGroup = options.groupColumn ? r.column(header, *options.groupColumn) : kNone;
  const std::size_t colStratum =
      options.stratumColumn ? r.column(header, *options.stratumColumn) : kNone;

  std::vector<stats::Lifespan> out;
  while (next(text)) {
    if (trim(text).empty()) continue;
    std::vector<std::string> f;
    try {
      f = splitCsvLine(text);
    } catch (const std::runtime_error& e) {
      r.fail(lineNo, e.what());
    }
    if (f.size() != header.size()) {
      r.fail(lineNo, fmt::format("{} fields where the header has {}", f.size(), header.size()));
    }
    stats::Lifespan l;
    l.divisions = r.divisions(lineNo, trim(f[colDivisions]));
    const std::string outcome = trim(f[colOutcome]);
    if (outcome == "death") {
      l.event = true;
    } else if (outcome == "censored") {
      l.event = false;
    } else {
      r.fail(lineNo,
             fmt::format("column 'outcome': \"{}\" is neither death nor censored", outcome));
    }
    l.group = colGroup != kNone ? trim(f[colGroup]) : options.defaultGroup;
    if (colGroup != kNone && l.group.empty()) {
      r.fail(lineNo, fmt::format("column '{}' is empty (every mother needs a group)",
                                 *options.groupColumn));
    }
    if (colStratum != kNone) {
      l.stratum = trim(f[colStratum]);
      if (l.stratum.empty()) {
        r.fail(lineNo, fmt::format("column '{}' is empty (every mother needs a stratum)",
                                   *options.stratumColumn));
      }
    }
    out.push_back(std::move(l));
  }
  if (in.bad()) r.fail("read error");
  if (out.empty()) r.fail("no lifespans (the file has a header but no rows)");
  return out;
}

}  // namespace budledger::cli
