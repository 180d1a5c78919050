#pragma once
// A plain-text summary of a project: what was imaged, what the engine found,
// and the current lifespans. Printed by `budledger-cli summary` and by the
// workstation when it has no display to open a window on.
#include <string>

#include "core/store/project.h"

namespace budledger::exporting {

std::string projectSummary(store::Project& project);

}  // namespace budledger::exporting
