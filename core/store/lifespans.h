#pragma once
// Current lifespans: lineage::tenuresFromEvents() run per position on the
// current events that count (not rejected), with the outcomes people set
// applied on top. The same function feeds exports, the UI's live results
// and sign-off digests, so what is signed is what is shown.
//
// The digest a sign-off binds is SHA-256 of this canonical text:
//   budledger-lifespans/1\n
//   scope=<named scope text>\n
//   one line per tenure in scope, sorted by (position name bytewise, trap, mother):
//   <position name>\t<trap>\t<mother>\t<first frame>\t<last frame>\t<divisions>\t<outcome>
//     \t<separation frames, comma-separated>\t<bud frames, comma-separated>\n
// (docs/project-file.md, "Lifespans digest").
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/lineage/lineage.h"
#include "core/store/current_event.h"
#include "core/store/project.h"
#include "core/store/replay.h"
#include "core/store/scope.h"

namespace budledger::store {

std::vector<lineage::Tenure> tenuresInScope(const std::vector<CurrentEvent>& events,
                                            const std::map<TenureKey, OutcomeOverride>& overrides,
                                            const std::vector<PositionRecord>& positions,
                                            const Scope& scope);

std::string lifespansCanonicalText(const std::vector<lineage::Tenure>& tenures,
                                   const std::map<int, std::string>& positionNames,
                                   std::string_view scopeName);
std::string lifespansDigest(const std::vector<lineage::Tenure>& tenures,
                            const std::map<int, std::string>& positionNames,
                            std::string_view scopeName);

// The named scope text for `scope` in `project` (throws StoreError for an unknown position).
std::string scopeName(const Scope& scope, const std::vector<PositionRecord>& positions);

// Over the project's materialised state.
std::vector<lineage::Tenure> currentTenures(Project& project,
                                            const Scope& scope = Scope::experiment());
std::string currentLifespansDigest(Project& project, const Scope& scope);

// The mother an event belongs to among its trap's tenures (in mother order):
// the last tenure that began at or before the event's frame.
std::optional<int> motherOf(const std::vector<lineage::Tenure>& trapTenures, int frame);

}  // namespace budledger::store
