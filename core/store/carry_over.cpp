#include "core/store/carry_over.h"

#include <algorithm>
#include <cstdlib>
#include <map>
#include <tuple>

namespace budledger::store {
namespace {
using Key = std::tuple<int, int, EventKind>;  // position, trap, kind
}

bool isDecision(const CurrentEvent& e) {
  if (e.status == EventStatus::Proposed) return false;
  if (!e.fromProposal() && e.status == EventStatus::Rejected) return false;
  return true;
}

CarryOverResult carryOver(const std::vector<CurrentEvent>& before,
                          const std::vector<Event>& proposals, int tolerance) {
  std::map<Key, std::vector<const CurrentEvent*>> decided;
  for (const auto& e : before)
    if (isDecision(e)) decided[{e.event.position, e.event.trap, e.event.kind}].push_back(&e);
  std::map<Key, std::vector<const Event*>> fresh;
  for (const auto& p : proposals) fresh[{p.position, p.trap, p.kind}].push_back(&p);

  CarryOverResult out;
  for (const auto& [key, olds] : decided) {
    std::vector<std::tuple<int, int, int, std::int64_t, std::int64_t, std::size_t, std::size_t>>
        pairs;  // distance, old frame, new frame, old id, new id, indices
    const auto it = fresh.find(key);
    if (it != fresh.end()) {
      for (std::size_t i = 0; i < olds.size(); ++i) {
        const auto& o = *olds[i];
        for (std::size_t j = 0; j < it->second.size(); ++j) {
          const auto& n = *it->second[j];
          int d = std::abs(n.frame - o.event.frame);
          if (o.proposedFrame) d = std::min(d, std::abs(n.frame - *o.proposedFrame));
          if (d <= tolerance) pairs.emplace_back(d, o.event.frame, n.frame, o.event.id, n.id, i, j);
        }
      }
    }
    std::sort(pairs.begin(), pairs.end());
    std::vector<bool> oldUsed(olds.size()), newUsed(it != fresh.end() ? it->second.size() : 0);
    for (const auto& p : pairs) {
      const auto i = std::get<5>(p);
      const auto j = std::get<6>(p);
      if (oldUsed[i] || newUsed[j]) continue;
      oldUsed[i] = newUsed[j] = true;
      out.carried.emplace_back(std::get<3>(p), std::get<4>(p));
    }
    for (std::size_t i = 0; i < olds.size(); ++i)
      if (!oldUsed[i] && olds[i]->fromProposal()) out.unmatched.push_back(olds[i]->event.id);
  }
  std::sort(out.carried.begin(), out.carried.end());
  std::sort(out.unmatched.begin(), out.unmatched.end());
  return out;
}

CurrentEvent inherit(const CurrentEvent& decided, const Event& proposal, std::int64_t seq) {
  CurrentEvent e;
  e.event = proposal;
  e.originProposal = proposal.id;
  e.proposedFrame = proposal.frame;
  e.lastSeq = seq;
  if (decided.status == EventStatus::Rejected) {
    e.status = EventStatus::Rejected;
    return e;
  }
  e.event.frame = decided.event.frame;
  e.status = e.event.frame == proposal.frame ? EventStatus::Accepted : EventStatus::Moved;
  return e;
}

}  // namespace budledger::store
