#include "app/cli/csv_reader.h"

#include <fmt/format.h>

#include <stdexcept>

namespace budledger::cli {

std::vector<CsvRecord> readCsv(std::istream& in, const std::string& fileName) {
  std::vector<CsvRecord> out;
  CsvRecord rec;
  std::string fieldText;
  bool quoted = false;
  bool any = false;  // anything in the current record
  int line = 1;
  rec.line = 1;
  char c = 0;
  auto endField = [&] {
    rec.fields.push_back(std::move(fieldText));
    fieldText.clear();
  };
  auto endRecord = [&] {
    endField();
    if (!(rec.fields.size() == 1 && rec.fields[0].empty())) out.push_back(std::move(rec));
    rec = CsvRecord{};
    rec.line = line;
    any = false;
  };
  while (in.get(c)) {
    if (quoted) {
      if (c == '"') {
        if (in.peek() == '"') {
          in.get(c);
          fieldText += '"';
        } else {
          quoted = false;
        }
      } else {
        if (c == '\n') ++line;
        fieldText += c;
      }
      continue;
    }
    switch (c) {
      case '"':
        quoted = true;
        any = true;
        break;
      case ',':
        endField();
        any = true;
        break;
      case '\r':
        break;
      case '\n':
        ++line;
        endRecord();
        break;
      default:
        fieldText += c;
        any = true;
    }
  }
  if (quoted)
    throw std::runtime_error(
        fmt::format("{}: row {}: a quoted field is not closed", fileName, rec.line));
  if (any || !fieldText.empty()) endRecord();
  return out;
}

}  // namespace budledger::cli
