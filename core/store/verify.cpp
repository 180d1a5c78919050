#include "core/store/verify.h"

#include <fmt/format.h>

#include <set>

#include "core/store/journal.h"
#include "core/store/lifespans.h"
#include "core/store/materialised.h"
#include "core/store/replay.h"

namespace budledger::store {
namespace {

std::optional<std::string> chainProblem(const std::vector<JournalEntry>& entries) {
  std::string prev = kGenesisHash;
  std::int64_t expected = 1;
  for (const auto& e : entries) {
    if (e.seq != expected)
      return fmt::format("journal entry {} is missing (the journal goes from {} to {})", expected,
                         expected - 1, e.seq);
    if (entryHash(e) != e.hash)
      return fmt::format(
          "journal entry {}: its content does not match its hash (changed after it "
          "was written)",
          e.seq);
    if (e.prevHash != prev)
      return fmt::format(
          "journal entry {}: its link to entry {} is broken (an entry before it was "
          "changed, removed or reordered)",
          e.seq, e.seq - 1);
    prev = e.hash;
    ++expected;
  }
  return std::nullopt;
}

std::string eventText(const CurrentEvent& e) {
  return fmt::format("{} frame {} {} origin {} proposed frame {} last entry {} confidence {}",
                     toString(e.event.kind), e.event.frame, toString(e.status),
                     e.originProposal ? std::to_string(*e.originProposal) : "none",
                     e.proposedFrame ? std::to_string(*e.proposedFrame) : "none", e.lastSeq,
                     e.event.confidence);
}

std::optional<std::string> stateProblem(const ReplayState& replayed, const ReplayState& stored) {
  auto a = replayed.events.begin();
  auto b = stored.events.begin();
  while (a != replayed.events.end() || b != stored.events.end()) {
    if (b == stored.events.end() || (a != replayed.events.end() && a->first < b->first))
      return fmt::format("current event {} is missing from the materialised state", a->first);
    if (a == replayed.events.end() || b->first < a->first)
      return fmt::format("current event {} is in the materialised state but not in the replay",
                         b->first);
    if (a->second.event.position != b->second.event.position ||
        a->second.event.trap != b->second.event.trap || !(a->second == b->second))
      return fmt::format("current event {}: stored as {}, the replay gives {}", a->first,
                         eventText(b->second), eventText(a->second));
    ++a;
    ++b;
  }
  if (replayed.outcomes != stored.outcomes)
    return std::string("the stored outcome overrides differ from the replay");
  for (const auto& [id, so] : replayed.signoffs) {
    const auto it = stored.signoffs.find(id);
    if (it == stored.signoffs.end() || !(it->second == so))
      return fmt::format("sign-off {} is stored differently from the journal's record", id);
  }
  if (stored.signoffs.size() != replayed.signoffs.size())
    return std::string("the stored sign-offs include one the journal does not record");
  if (replayed.review != stored.review)
    return std::string("the stored carry-over review list differs from the replay");
  return std::nullopt;
}

}  // namespace

VerifyReport verifyProject(Project& project) {
  auto& db = project.db();
  VerifyReport r;
  {
    auto st = db.prepare("PRAGMA quick_check");
    while (st.step())
      if (st.text(0) != "ok") r.problems.push_back("SQLite integrity check: " + st.text(0));
  }
  const auto entries = readJournal(db);
  r.entries = static_cast<std::int64_t>(entries.size());
  if (!entries.empty()) r.head = fmt::format("{}:{}", entries.back().seq, entries.back().hash);
  if (auto p = chainProblem(entries)) r.problems.push_back(*p);

  const auto sources = loadReplaySources(db);
  r.runs = static_cast<int>(sources.proposals.size());
  const auto result = replay(entries, sources);
  if (result.problem)
    r.problems.push_back(
        fmt::format("journal entry {}: {}", result.problem->seq, result.problem->what));
  const auto& state = result.state;
  r.events = state.events.size();

  std::set<std::int64_t> journaledRuns;
  for (const auto& e : entries)
    if (e.action == JournalAction::EngineRun)
      if (auto t = parseTarget(e.target)) journaledRuns.insert(t->id);
  for (const auto& [run, proposals] : sources.proposals)
    if (!journaledRuns.contains(run))
      r.problems.push_back(fmt::format("engine run {} has no journal entry", run));

  if (!result.problem) {
    if (auto p = stateProblem(state, readState(db))) r.problems.push_back(*p);
    const auto positions = project.positions();
    std::vector<CurrentEvent> events;
    events.reserve(state.events.size());
    for (const auto& [id, e] : state.events) events.push_back(e);
    for (const auto& [id, so] : state.signoffs) {
      if (!so.active()) continue;
      ++r.signOffsChecked;
      const auto tenures = tenuresInScope(events, state.outcomes, positions, so.scope);
      if (lifespansDigest(tenures, sources.positionNames, so.scopeName) != so.digest)
        r.problems.push_back(fmt::format(
            "sign-off {} ({} {} by {} as {}): the lifespans no longer match the signed digest", id,
            toString(so.meaning), so.scopeName, so.person, so.role));
    }
  }

  const auto recordedHead = project.meta("journal_head").value_or("");
  if (recordedHead != r.head)
    r.problems.push_back(fmt::format(
        "the recorded journal head '{}' is not the last entry '{}' (entries removed from the end?)",
        recordedHead, r.head));

  auto triggers = db.prepare(
      "SELECT count(*) FROM sqlite_master WHERE type = 'trigger' AND name IN "
      "('journal_no_update', 'journal_no_delete')");
  triggers.step();
  if (triggers.integer(0) != 2)
    r.problems.push_back("the triggers that keep the journal append-only have been removed");
  return r;
}

}  // namespace budledger::store
