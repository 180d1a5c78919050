#pragma once
// The traps export: one row per trap of every position, with header
// position,trap_id,row,col,x,y,edge (x, y: cup centre in frame-0 pixels;
// edge: 1 if the image edge cuts the trap). The same file, edited, can be
// given back to `budledger-cli analyze --traps`.
#include <filesystem>
#include <ostream>

#include "core/store/project.h"

namespace budledger::exporting {

void writeTrapsCsv(store::Project& project, std::ostream& out);
// Writes to a temporary file beside `file` and renames it into place.
void exportTrapsCsv(store::Project& project, const std::filesystem::path& file);

}  // namespace budledger::exporting
