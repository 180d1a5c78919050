#include "core/store/materialised.h"

#include <fmt/format.h>

#include "core/store/journal.h"

namespace budledger::store {
namespace {

constexpr std::string_view kEventColumns =
    "SELECT event_id, position_id, trap_id, frame, kind, confidence, status, origin_proposal, "
    "proposed_frame, last_seq FROM current_events ";

CurrentEvent eventRow(const Statement& st) {
  CurrentEvent e;
  e.event.id = st.int64(0);
  e.event.position = st.integer(1);
  e.event.trap = st.integer(2);
  e.event.frame = st.integer(3);
  e.event.kind = eventKindFromString(st.text(4)).value_or(EventKind::Bud);
  e.event.confidence = st.real(5);
  e.status = eventStatusFromString(st.text(6)).value_or(EventStatus::Proposed);
  if (!st.isNull(7)) e.originProposal = st.int64(7);
  if (!st.isNull(8)) e.proposedFrame = st.integer(8);
  e.lastSeq = st.int64(9);
  return e;
}

std::vector<CurrentEvent> collect(Statement& st) {
  std::vector<CurrentEvent> out;
  while (st.step()) out.push_back(eventRow(st));
  return out;
}

}  // namespace

ReplaySources loadReplaySources(Database& db) {
  ReplaySources src;
  auto names = db.prepare("SELECT id, name FROM positions");
  while (names.step()) src.positionNames.emplace(names.integer(0), names.text(1));
  auto runs = db.prepare("SELECT id FROM engine_runs");
  while (runs.step()) src.proposals[runs.int64(0)];
  auto st = db.prepare(
      "SELECT run_id, id, position_id, trap_id, frame, kind, confidence FROM proposals "
      "ORDER BY run_id, id");
  std::int64_t run = -1;
  std::vector<Event>* into = nullptr;
  while (st.step()) {
    if (st.int64(0) != run) {
      run = st.int64(0);
      into = &src.proposals[run];
    }
    Event e;
    e.id = st.int64(1);
    e.position = st.integer(2);
    e.trap = st.integer(3);
    e.frame = st.integer(4);
    e.kind = eventKindFromString(st.text(5)).value_or(EventKind::Bud);
    e.confidence = st.real(6);
    into->push_back(e);
  }
  return src;
}

ReplayState readState(Database& db) {
  ReplayState s;
  for (auto& e : currentEvents(db)) s.events.emplace(e.event.id, e);
  s.outcomes = outcomeOverrides(db);
  for (auto& so : signOffs(db)) s.signoffs.emplace(so.id, so);
  s.review = reviewItems(db);
  return s;
}

void writeState(Database& db, const ReplayState& s) {
  db.exec(
      "DELETE FROM current_events; DELETE FROM outcome_overrides; DELETE FROM signoffs; "
      "DELETE FROM carry_over_review;");
  insertEvents(db, s.events);
  auto oc = db.prepare(
      "INSERT INTO outcome_overrides(position_id, trap_id, mother, outcome, last_seq) "
      "VALUES (?1,?2,?3,?4,?5)");
  for (const auto& [k, o] : s.outcomes)
    oc.bind(1, k.position)
        .bind(2, k.trap)
        .bind(3, k.mother)
        .bind(4, toString(o.outcome))
        .bind(5, o.lastSeq)
        .run();
  auto so = db.prepare(
      "INSERT INTO signoffs(id, scope_kind, position_id, trap_id, scope_name, person, role, "
      "meaning, digest, utc, revoked_seq) VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11)");
  for (const auto& [id, r] : s.signoffs) {
    so.bind(1, id).bind(2, toString(r.scope.kind));
    if (r.scope.kind == Scope::Kind::Experiment)
      so.bindNull(3);
    else
      so.bind(3, r.scope.position);
    if (r.scope.kind == Scope::Kind::Trap)
      so.bind(4, r.scope.trap);
    else
      so.bindNull(4);
    so.bind(5, r.scopeName)
        .bind(6, r.person)
        .bind(7, r.role)
        .bind(8, toString(r.meaning))
        .bind(9, r.digest)
        .bind(10, r.utc);
    if (r.revokedSeq)
      so.bind(11, *r.revokedSeq);
    else
      so.bindNull(11);
    so.run();
  }
  insertReview(db, s.review);
}

bool sameMaterialised(const ReplayState& a, const ReplayState& b) {
  return a.events == b.events && a.outcomes == b.outcomes && a.signoffs == b.signoffs &&
         a.review == b.review;
}

void bindEventRow(Statement& ins, const CurrentEvent& e) {
  ins.bind(1, e.event.id)
      .bind(2, e.event.position)
      .bind(3, e.event.trap)
      .bind(4, e.event.frame)
      .bind(5, toString(e.event.kind))
      .bind(6, e.event.confidence)
      .bind(7, toString(e.status));
  if (e.originProposal)
    ins.bind(8, *e.originProposal);
  else
    ins.bindNull(8);
  if (e.proposedFrame)
    ins.bind(9, *e.proposedFrame);
  else
    ins.bindNull(9);
  ins.bind(10, e.lastSeq);
}

void insertEvents(Database& db, const std::map<std::int64_t, CurrentEvent>& events) {
  auto ins = db.prepare(kInsertEventSql);
  for (const auto& [id, e] : events) {
    bindEventRow(ins, e);
    ins.run();
  }
}

void insertReview(Database& db, const std::vector<ReviewItem>& items) {
  auto rv = db.prepare(
      "INSERT INTO carry_over_review(run_id, event_id, position_id, trap_id, frame, kind, "
      "status) VALUES (?1,?2,?3,?4,?5,?6,?7)");
  for (const auto& r : items)
    rv.bind(1, r.run)
        .bind(2, r.eventId)
        .bind(3, r.state.position)
        .bind(4, r.state.trap)
        .bind(5, r.state.frame)
        .bind(6, toString(r.state.kind))
        .bind(7, toString(r.state.status))
        .run();
}

void rebuildState(Database& db) {
  Transaction tx(db);
  const auto result = replay(readJournal(db), loadReplaySources(db));
  if (result.problem)
    throw StoreError(
        fmt::format("journal entry {}: {}", result.problem->seq, result.problem->what));
  writeState(db, result.state);
  tx.commit();
}

std::vector<CurrentEvent> currentEvents(Database& db) {
  auto st =
      db.prepare(std::string(kEventColumns) + "ORDER BY position_id, trap_id, frame, event_id");
  return collect(st);
}

std::vector<CurrentEvent> currentEvents(Database& db, int position) {
  auto st = db.prepare(std::string(kEventColumns) +
                       "WHERE position_id = ?1 ORDER BY trap_id, frame, event_id");
  st.bind(1, position);
  return collect(st);
}

std::vector<CurrentEvent> currentEvents(Database& db, const TrapRef& t) {
  auto st = db.prepare(std::string(kEventColumns) +
                       "WHERE position_id = ?1 AND trap_id = ?2 ORDER BY frame, event_id");
  st.bind(1, t.position).bind(2, t.trap);
  return collect(st);
}

std::optional<CurrentEvent> currentEvent(Database& db, std::int64_t id) {
  auto st = db.prepare(std::string(kEventColumns) + "WHERE event_id = ?1");
  st.bind(1, id);
  if (!st.step()) return std::nullopt;
  return eventRow(st);
}

std::map<TenureKey, OutcomeOverride> outcomeOverrides(Database& db) {
  std::map<TenureKey, OutcomeOverride> out;
  auto st =
      db.prepare("SELECT position_id, trap_id, mother, outcome, last_seq FROM outcome_overrides");
  while (st.step())
    out[{st.integer(0), st.integer(1), st.integer(2)}] = {
        outcomeFromString(st.text(3)).value_or(Outcome::Death), st.int64(4)};
  return out;
}

std::vector<SignOffRecord> signOffs(Database& db) {
  std::vector<SignOffRecord> out;
  auto st = db.prepare(
      "SELECT id, scope_kind, position_id, trap_id, scope_name, person, role, meaning, digest, "
      "utc, revoked_seq FROM signoffs ORDER BY id");
  while (st.step()) {
    SignOffRecord r;
    r.id = st.int64(0);
    r.scope.kind = scopeKindFromString(st.text(1)).value_or(Scope::Kind::Experiment);
    if (!st.isNull(2)) r.scope.position = st.integer(2);
    if (!st.isNull(3)) r.scope.trap = st.integer(3);
    r.scopeName = st.text(4);
    r.person = st.text(5);
    r.role = st.text(6);
    r.meaning = signMeaningFromString(st.text(7)).value_or(SignMeaning::Reviewed);
    r.digest = st.text(8);
    r.utc = st.text(9);
    if (!st.isNull(10)) r.revokedSeq = st.int64(10);
    out.push_back(std::move(r));
  }
  return out;
}

std::vector<ReviewItem> reviewItems(Database& db) {
  std::vector<ReviewItem> out;
  auto st = db.prepare(
      "SELECT run_id, event_id, position_id, trap_id, frame, kind, status "
      "FROM carry_over_review ORDER BY run_id, event_id");
  while (st.step()) {
    ReviewItem r;
    r.run = st.int64(0);
    r.eventId = st.int64(1);
    r.state.position = st.integer(2);
    r.state.trap = st.integer(3);
    r.state.frame = st.integer(4);
    r.state.kind = eventKindFromString(st.text(5)).value_or(EventKind::Bud);
    r.state.status = eventStatusFromString(st.text(6)).value_or(EventStatus::Proposed);
    out.push_back(std::move(r));
  }
  return out;
}

}  // namespace budledger::store
