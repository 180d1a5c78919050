#pragma once
// Reads the lifespans export (one row per mother: position, trap_id, mother_id,
// first_frame, last_frame, divisions, outcome, censor_reason, then any extra
// columns such as strain or condition) into stats::Lifespan records. Only
// `divisions` and `outcome` are required, plus the columns named for grouping
// and strata. Every problem throws InputError naming the file, the line and
// the column, in one line.
#include <optional>
#include <string>
#include <vector>

#include "core/stats/lifespan.h"

namespace budledger::cli {

struct LifespanCsvOptions {
  std::optional<std::string> groupColumn;    // none: one group
  std::optional<std::string> stratumColumn;  // none: one stratum
  std::string defaultGroup = "all";
};

std::vector<stats::Lifespan> readLifespansCsv(const std::string& path,
                                              const LifespanCsvOptions& options);

// Splits one CSV record (RFC 4180 quoting); throws std::runtime_error on an
// unterminated quote.
std::vector<std::string> splitCsvLine(const std::string& line);

}  // namespace budledger::cli
