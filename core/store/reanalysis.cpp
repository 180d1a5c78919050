#include "core/store/reanalysis.h"

#include <fmt/format.h>

#include "core/store/carry_over.h"
#include "core/store/engine_run_entry.h"
#include "core/store/materialised.h"
#include "core/store/replay.h"

namespace budledger::store {
namespace {

std::vector<Event> runProposals(Database& db, std::int64_t run) {
  std::vector<Event> out;
  auto st = db.prepare(
      "SELECT id, position_id, trap_id, frame, kind, confidence FROM proposals WHERE run_id = ?1 "
      "ORDER BY id");
  st.bind(1, run);
  while (st.step()) {
    Event e;
    e.id = st.int64(0);
    e.position = st.integer(1);
    e.trap = st.integer(2);
    e.frame = st.integer(3);
    e.kind = eventKindFromString(st.text(4)).value_or(EventKind::Bud);
    e.confidence = st.real(5);
    out.push_back(e);
  }
  return out;
}

}  // namespace

void journalEngineRun(Database& db, std::int64_t run, const std::vector<int>& positions,
                      const Actor& by, const std::string& reason) {
  ReplaySources src;
  auto names = db.prepare("SELECT id, name FROM positions");
  while (names.step()) src.positionNames.emplace(names.integer(0), names.text(1));
  src.proposals[run] = runProposals(db, run);

  // The part of the state the run can touch: its positions' events, plus the
  // sign-offs that may forbid it.
  ReplayState state;
  std::vector<CurrentEvent> before;
  for (int p : positions)
    for (auto& e : currentEvents(db, p)) {
      before.push_back(e);
      state.events.emplace(e.event.id, std::move(e));
    }
  for (auto& so : signOffs(db)) state.signoffs.emplace(so.id, std::move(so));

  EngineRunValue value;
  value.run = run;
  value.positions = positions;
  value.proposals = static_cast<std::int64_t>(src.proposals[run].size());
  value.digest = proposalsDigest(src.proposals[run], src.positionNames);
  value.carry = carryOver(before, src.proposals[run]);

  JournalWriter writer(db);
  JournalEntry entry;
  entry.seq = writer.nextSeq();
  entry.actor = by.name;
  entry.role = by.role;
  entry.action = JournalAction::EngineRun;
  entry.target = toString(Target::run(run));
  entry.after = engineRunJson(value);
  entry.reason = reason;
  if (auto problem = applyEntry(state, entry, src, [](std::int64_t) { return nullptr; }))
    throw StoreError(fmt::format("engine run {} refused: {}", run, *problem));
  writer.append(entry);

  auto del = db.prepare("DELETE FROM current_events WHERE position_id = ?1");
  for (int p : positions) del.bind(1, p).run();
  insertEvents(db, state.events);
  insertReview(db, state.review);
}

}  // namespace budledger::store
