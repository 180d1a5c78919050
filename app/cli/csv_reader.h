#pragma once
// A small RFC 4180 reader for the CSV files verbs take as input (edit
// --batch): quoted fields with doubled quotes and line breaks, CRLF or LF.
// Each record keeps the line it started on, so errors can name it.
#include <istream>
#include <string>
#include <vector>

namespace budledger::cli {

struct CsvRecord {
  int line = 0;  // 1-based line of the file where the record starts
  std::vector<std::string> fields;
};

// Throws std::runtime_error naming the line of an unterminated quote.
std::vector<CsvRecord> readCsv(std::istream& in, const std::string& fileName);

}  // namespace budledger::cli
