#include "core/store/replay.h"

#include <fmt/format.h>

#include <algorithm>
#include <nlohmann/json.hpp>
#include <set>

#include "core/store/carry_over.h"
#include "core/store/engine_run_entry.h"

namespace budledger::store {
namespace {

using Problem = std::optional<std::string>;

std::string describe(const std::optional<EventState>& s) { return stateJson(s); }

struct OutcomeValue {
  bool override = false;
  Outcome outcome = Outcome::EndOfImaging;
};

OutcomeValue parseOutcome(std::string_view json) {
  try {
    const auto j = nlohmann::json::parse(json);
    OutcomeValue v;
    v.override = j.at("override").get<bool>();
    const auto o = outcomeFromString(j.at("outcome").get<std::string>());
    if (!o) throw StoreError("unknown outcome");
    v.outcome = *o;
    return v;
  } catch (const nlohmann::json::exception& e) {
    throw StoreError(fmt::format("malformed outcome value '{}': {}", json, e.what()));
  }
}

Problem signedScope(const ReplayState& s, const TrapRef& t) {
  if (const auto* so = activeSignOffCovering(s, t))
    return fmt::format("changes trap {}/{} inside sign-off {} ({}), which was not revoked",
                       t.position, t.trap, so->id, so->scopeName);
  return std::nullopt;
}

Problem applyEventEdit(ReplayState& s, JournalAction action, const Target& t,
                       std::string_view beforeJson, std::string_view afterJson, std::int64_t seq) {
  if (t.kind != Target::Kind::Event) return "target is not an event";
  const auto before = parseEventState(beforeJson);
  const auto after = parseEventState(afterJson);
  auto it = s.events.find(t.id);
  const std::optional<EventState> current =
      it == s.events.end() ? std::nullopt : std::optional<EventState>(stateOf(it->second));
  if (current != before)
    return fmt::format("value before {} does not match the replayed event {}", describe(before),
                       describe(current));
  if (!after) {
    if (!before) return "records no change";
    if (t.id >= 0) return "removes an event the engine proposed (only added events can vanish)";
    if (auto p = signedScope(s, {before->position, before->trap})) return p;
    s.events.erase(it);
    return std::nullopt;
  }
  if (auto p = signedScope(s, {after->position, after->trap})) return p;
  if (action == JournalAction::Accept && after->status != EventStatus::Accepted &&
      after->status != EventStatus::Added)
    return "accept leaves the event neither accepted nor added";
  if (action == JournalAction::Delete && after->status != EventStatus::Rejected)
    return "delete leaves the event not rejected";
  if (action == JournalAction::Add && (before || t.id != -seq))
    return "add must create event -seq from nothing";
  if (it == s.events.end()) {
    if (t.id >= 0 || after->status != EventStatus::Added)
      return "creates an event that is neither proposed nor added";
    CurrentEvent e;
    e.event = {t.id, after->position, after->trap, after->frame, after->kind, 1.0};
    e.status = EventStatus::Added;
    e.lastSeq = seq;
    s.events.emplace(t.id, e);
    return std::nullopt;
  }
  auto& e = it->second;
  if (after->position != e.event.position || after->trap != e.event.trap ||
      after->kind != e.event.kind)
    return "changes an event's position, trap or kind";
  const bool added = !e.fromProposal();
  const bool okStatus =
      added ? (after->status == EventStatus::Added || after->status == EventStatus::Rejected)
            : after->status != EventStatus::Added;
  if (!okStatus) return fmt::format("status {} is not possible here", toString(after->status));
  e.event.frame = after->frame;
  e.status = after->status;
  e.lastSeq = seq;
  return std::nullopt;
}

Problem applyOutcome(ReplayState& s, const Target& t, std::string_view beforeJson,
                     std::string_view afterJson, std::int64_t seq) {
  if (t.kind != Target::Kind::Tenure) return "target is not a tenure";
  const TenureKey key{t.position, t.trap, t.mother};
  const auto before = parseOutcome(beforeJson);
  const auto after = parseOutcome(afterJson);
  const auto it = s.outcomes.find(key);
  const bool has = it != s.outcomes.end();
  if (before.override != has || (has && before.outcome != it->second.outcome))
    return "outcome before does not match the replayed outcome";
  if (auto p = signedScope(s, {t.position, t.trap})) return p;
  if (after.override)
    s.outcomes[key] = {after.outcome, seq};
  else if (has)
    s.outcomes.erase(it);
  return std::nullopt;
}

Problem applySignOff(ReplayState& s, const JournalEntry& e, const ReplaySources& src) {
  const auto scope = scopeFromIdText(e.target);
  if (!scope) return "target is not a scope";
  if (e.before != "null") return "a sign-off has no value before";
  const auto v = parseSignOffJson(e.after);
  std::string name;
  if (scope->kind != Scope::Kind::Experiment) {
    const auto it = src.positionNames.find(scope->position);
    if (it == src.positionNames.end()) return "signs a position that does not exist";
    name = it->second;
  }
  if (namedText(*scope, name) != v.scopeName)
    return fmt::format("scope '{}' does not name target {}", v.scopeName, e.target);
  SignOffRecord r;
  r.id = e.seq;
  r.scope = *scope;
  r.scopeName = v.scopeName;
  r.person = e.actor;
  r.role = e.role;
  r.meaning = v.meaning;
  r.digest = v.digest;
  r.utc = e.utc;
  s.signoffs.emplace(e.seq, std::move(r));
  return std::nullopt;
}

Problem applyRevoke(ReplayState& s, const JournalEntry& e) {
  const auto t = parseTarget(e.target);
  if (!t || t->kind != Target::Kind::SignOff) return "target is not a sign-off";
  const auto it = s.signoffs.find(t->id);
  if (it == s.signoffs.end())
    return fmt::format("revokes sign-off {}, which does not exist", t->id);
  if (!it->second.active())
    return fmt::format("revokes sign-off {}, which was already revoked", t->id);
  if (e.before != kActiveJson || e.after != kRevokedJson)
    return "revoke values are not the fixed ones";
  it->second.revokedSeq = e.seq;
  return std::nullopt;
}

Problem applyEngineRun(ReplayState& s, const JournalEntry& e, const ReplaySources& src) {
  const auto t = parseTarget(e.target);
  if (!t || t->kind != Target::Kind::Run) return "target is not an engine run";
  if (e.before != "null") return "an engine run has no value before";
  const auto v = parseEngineRunJson(e.after);
  if (v.run != t->id) return "value names another run than the target";
  const auto pit = src.proposals.find(v.run);
  static const std::vector<Event> kNone;
  const auto& proposals = pit == src.proposals.end() ? kNone : pit->second;
  if (static_cast<std::int64_t>(proposals.size()) != v.proposals)
    return fmt::format("run {} has {} proposals, the journal recorded {}", v.run, proposals.size(),
                       v.proposals);
  if (proposalsDigest(proposals, src.positionNames) != v.digest)
    return fmt::format("the proposals of run {} do not match their recorded digest", v.run);
  const std::set<int> covered(v.positions.begin(), v.positions.end());
  for (const auto& p : proposals)
    if (!covered.contains(p.position))
      return fmt::format("run {} proposes for position {}, which it does not cover", v.run,
                         p.position);
  for (const auto& [id, so] : s.signoffs)
    for (int p : covered)
      if (so.active() && so.scope.coversPosition(p))
        return fmt::format("re-analyses position {} inside sign-off {} ({}), which was not revoked",
                           p, id, so.scopeName);

  std::vector<CurrentEvent> before;
  for (const auto& [id, ev] : s.events)
    if (covered.contains(ev.event.position)) before.push_back(ev);
  const auto carry = carryOver(before, proposals);
  if (carry.carried != v.carry.carried || carry.unmatched != v.carry.unmatched)
    return "the recorded carry-over is not the one the decisions and proposals give";

  std::map<std::int64_t, const CurrentEvent*> heir;  // new proposal id -> decision it inherits
  std::map<std::int64_t, CurrentEvent> kept;
  for (const auto& ev : before) kept.emplace(ev.event.id, ev);
  std::set<std::int64_t> carried;
  for (const auto& [o, n] : carry.carried) {
    heir[n] = &kept.at(o);
    carried.insert(o);
  }
  for (const auto& ev : before) {
    const bool undecided = ev.fromProposal() && ev.status == EventStatus::Proposed;
    if (undecided || carried.contains(ev.event.id)) s.events.erase(ev.event.id);
  }
  for (const auto& p : proposals) {
    if (s.events.contains(p.id)) return fmt::format("proposal id {} is already an event", p.id);
    const auto h = heir.find(p.id);
    CurrentEvent ce;
    if (h != heir.end()) {
      ce = inherit(*h->second, p, e.seq);
    } else {
      ce.event = p;
      ce.originProposal = p.id;
      ce.proposedFrame = p.frame;
      ce.lastSeq = e.seq;
    }
    s.events.emplace(p.id, ce);
  }
  for (auto id : carry.unmatched) s.review.push_back({v.run, id, stateOf(kept.at(id))});
  std::stable_sort(s.review.begin(), s.review.end(), [](const auto& a, const auto& b) {
    return std::pair(a.run, a.eventId) < std::pair(b.run, b.eventId);
  });
  // Re-analysis starts a new undo history: the decisions live on through the
  // carry-over, but undo does not reach back across a new set of proposals.
  s.undo.clear();
  s.redo.clear();
  return std::nullopt;
}

Problem applyUndoRedo(ReplayState& s, const JournalEntry& e, const EntryLookup& lookup) {
  const bool isUndo = e.action == JournalAction::Undo;
  const auto t = parseTarget(e.target);
  if (!t || t->kind != Target::Kind::Entry) return "target is not a journal entry";
  const JournalEntry* x = lookup(t->id);
  if (!x || x->seq >= e.seq) return fmt::format("names entry {}, which does not precede it", t->id);
  if (!isUndoableEdit(x->action))
    return fmt::format("names entry {} ({}), which cannot be undone", x->seq, toString(x->action));
  auto& from = isUndo ? s.undo : s.redo;
  if (e.origin.empty() && (from.empty() || from.back() != x->seq))
    return fmt::format("{} of entry {} is not the top of the {} stack", toString(e.action), x->seq,
                       isUndo ? "undo" : "redo");
  if (e.before != (isUndo ? x->after : x->before) || e.after != (isUndo ? x->before : x->after))
    return fmt::format("values do not {} entry {}", isUndo ? "reverse" : "repeat", x->seq);
  const auto xt = parseTarget(x->target);
  if (!xt) return "the entry it names has no valid target";
  Problem p = x->action == JournalAction::SetOutcome
                  ? applyOutcome(s, *xt, e.before, e.after, e.seq)
                  : applyEventEdit(s, isUndo ? JournalAction::Undo : JournalAction::Redo, *xt,
                                   e.before, e.after, e.seq);
  if (p) return p;
  if (!from.empty() && from.back() == x->seq) from.pop_back();
  (isUndo ? s.redo : s.undo).push_back(x->seq);
  return std::nullopt;
}

}  // namespace

std::string outcomeJson(std::optional<Outcome> override, Outcome effective) {
  return fmt::format(R"({{"outcome":"{}","override":{}}})", toString(override.value_or(effective)),
                     override ? "true" : "false");
}

const SignOffRecord* activeSignOffCovering(const ReplayState& state, const TrapRef& trap) {
  for (const auto& [id, so] : state.signoffs)
    if (so.active() && so.scope.covers(trap)) return &so;
  return nullptr;
}

std::optional<std::string> applyEntry(ReplayState& s, const JournalEntry& e,
                                      const ReplaySources& src, const EntryLookup& lookup) {
  if (e.unknownAction) return fmt::format("unknown action '{}'", *e.unknownAction);
  try {
    Problem p;
    switch (e.action) {
      case JournalAction::Accept:
      case JournalAction::Move:
      case JournalAction::Delete:
      case JournalAction::Add:
      case JournalAction::SetOutcome: {
        const auto t = parseTarget(e.target);
        if (!t) return fmt::format("target '{}' is not valid", e.target);
        p = e.action == JournalAction::SetOutcome
                ? applyOutcome(s, *t, e.before, e.after, e.seq)
                : applyEventEdit(s, e.action, *t, e.before, e.after, e.seq);
        if (!p) {
          if (e.origin.empty()) {
            s.undo.push_back(e.seq);
          } else {
            s.undo.clear();  // imported by a merge: not this project's history to undo
          }
          s.redo.clear();
        }
        return p;
      }
      case JournalAction::Note:
        if (!parseTarget(e.target)) return fmt::format("target '{}' is not valid", e.target);
        return std::nullopt;
      case JournalAction::Undo:
      case JournalAction::Redo:
        p = applyUndoRedo(s, e, lookup);
        if (!p && !e.origin.empty()) {
          s.undo.clear();
          s.redo.clear();
        }
        return p;
      case JournalAction::SignOff:
        return applySignOff(s, e, src);
      case JournalAction::Revoke:
        return applyRevoke(s, e);
      case JournalAction::EngineRun:
        return applyEngineRun(s, e, src);
    }
  } catch (const StoreError& err) {
    return std::string(err.what());
  }
  return "unknown action";
}

ReplayResult replay(const std::vector<JournalEntry>& entries, const ReplaySources& sources) {
  ReplayResult r;
  const EntryLookup lookup = [&](std::int64_t seq) -> const JournalEntry* {
    if (seq < 1 || seq > static_cast<std::int64_t>(entries.size())) return nullptr;
    const auto& e = entries[static_cast<std::size_t>(seq - 1)];
    return e.seq == seq ? &e : nullptr;
  };
  std::int64_t expected = 1;
  for (const auto& e : entries) {
    if (e.seq != expected) {
      r.problem = ReplayProblem{expected, fmt::format("entry {} is missing", expected)};
      return r;
    }
    ++expected;
    if (auto p = applyEntry(r.state, e, sources, lookup)) {
      r.problem = ReplayProblem{e.seq, *p};
      return r;
    }
  }
  return r;
}

}  // namespace budledger::store
