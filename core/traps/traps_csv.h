#pragma once
// A trap layout supplied by the user as CSV, to replace or correct the one
// found automatically. Columns by header name: x and y (cup centre, frame-0
// pixels) are required; position, trap_id, row, col and edge are optional
// (the traps export writes all of them, so an exported file can be edited
// and fed back). Rows with a position apply to that position only; rows
// without one apply to every position.
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "core/traps/trap_layout.h"

namespace budledger::traps {

struct SuppliedTrap {
  std::string position;
  std::optional<int> id, row, col;
  cv::Point2d centre;
  long line = 0;  // for messages
};

// Throws InputError naming the file and line for anything malformed.
std::vector<SuppliedTrap> readTrapsCsv(const std::filesystem::path& file);

// The layout of one position from supplied rows: ids, rows and columns are
// taken from the file when every row has them (checked to be unique), else
// assigned row-major. Support, crop and template come from `detected` (the
// layout found in the images) when given, else from the spacing of the
// centres. Throws InputError when no row applies to the position or when ids
// repeat.
TrapLayout layoutFromSupplied(const std::vector<SuppliedTrap>& rows, const std::string& position,
                              const std::filesystem::path& file, const TrapLayout* detected);

}  // namespace budledger::traps
