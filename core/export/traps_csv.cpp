#include "core/export/traps_csv.h"

#include <fmt/format.h>
#include <unistd.h>

#include <fstream>
#include <map>
#include <stdexcept>

namespace budledger::exporting {
namespace {
// RFC 4180 quoting for names that need it.
std::string csvField(const std::string& s) {
  if (s.find_first_of(",\"\n\r") == std::string::npos) return s;
  std::string q = "\"";
  for (char c : s) q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + "\"";
}
}  // namespace

void writeTrapsCsv(store::Project& project, std::ostream& out) {
  std::map<int, std::string> names;
  for (const auto& p : project.positions()) names[p.id] = p.name;
  out << "position,trap_id,row,col,x,y,edge\n";
  for (const auto& t : project.traps())
    out << fmt::format("{},{},{},{},{:.3f},{:.3f},{}\n", csvField(names[t.position]), t.trap, t.row,
                       t.col, t.x, t.y, t.edge ? 1 : 0);
}

void exportTrapsCsv(store::Project& project, const std::filesystem::path& file) {
  const auto tmp =
      file.parent_path() / fmt::format(".{}.partial-{}", file.filename().string(), ::getpid());
  {
    std::ofstream out(tmp);
    if (!out) throw std::runtime_error(fmt::format("cannot write '{}'", file.string()));
    writeTrapsCsv(project, out);
    out.flush();
    if (!out) {
      std::error_code ec;
      std::filesystem::remove(tmp, ec);
      throw std::runtime_error(fmt::format("cannot write '{}'", file.string()));
    }
  }
  std::filesystem::rename(tmp, file);
}

}  // namespace budledger::exporting
