#pragma once
// Merge: combine per-position projects analysed on different machines (one
// position per process, docs/scaling.md) into one experiment. Refuses
// conflicting inputs with a message naming both files: the same position
// name twice, the same input stack under two names, different frame
// intervals or pixel sizes, a source that does not verify, or a source
// signed off experiment-wide (that digest cannot hold for the union).
//
// Nothing is lost: positions, inputs, traps, drift, engine runs, proposals
// and measurements are copied with new ids; each source's journal is
// appended in order with ids rewritten to the new numbering, keeping its
// time, actor, role and reason, and naming the original entry in `origin`
// ("<file>#<seq>:<hash>") so the source chain can still be checked. A final
// note records the merge. The output is written to a temporary file, verified
// and only then renamed into place.
#include <string>
#include <vector>

#include "core/store/journal.h"

namespace budledger::store {

struct MergeRequest {
  std::vector<std::string> sources;
  std::string out;
  Actor by;
};

struct MergeSummary {
  int positions = 0;
  std::int64_t entries = 0;  // in the merged journal, the closing note included
};

// Throws StoreError with a one-line reason when it refuses.
MergeSummary mergeProjects(const MergeRequest& request);

}  // namespace budledger::store
