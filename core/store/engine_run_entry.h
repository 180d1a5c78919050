#pragma once
// The journal entry written when an engine run's proposals arrive. It binds
// the run's proposals by digest (so proposals changed behind BudLedger's back
// are caught) and records which positions the run covers and how the earlier
// decisions were carried over to it (carry_over.h).
#include <cstdint>
#include <map>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "core/base/events.h"
#include "core/store/carry_over.h"

namespace budledger::store {

struct EngineRunValue {
  std::int64_t run = 0;
  std::vector<int> positions;  // position ids the run covers, ascending
  std::int64_t proposals = 0;  // how many
  std::string digest;          // proposalsDigest()
  CarryOverResult carry;
};

// {"carried":[[old,new],…],"digest":"…","positions":[…],"proposals":N,"run":R,"unmatched":[…]}
std::string engineRunJson(const EngineRunValue& v);
EngineRunValue parseEngineRunJson(std::string_view json);  // throws StoreError

// SHA-256 of "budledger-proposals/1\n" followed by one line per proposal,
// "<position name>\t<trap>\t<frame>\t<kind>\t<confidence>\n", lines sorted
// bytewise; confidence is the shortest decimal that reads back to the same
// double. Ids are left out so that a merge, which renumbers, keeps the digest.
std::string proposalsDigest(const std::vector<Event>& proposals,
                            const std::map<int, std::string>& positionNames);

}  // namespace budledger::store
