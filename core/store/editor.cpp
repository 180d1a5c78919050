#include "core/store/editor.h"

#include <fmt/format.h>

#include <map>
#include <nlohmann/json.hpp>

#include "core/lineage/lineage.h"
#include "core/store/current_event.h"
#include "core/store/lifespans.h"
#include "core/store/materialised.h"
#include "core/store/replay.h"
#include "core/store/undo_history.h"

namespace budledger::store {

struct Editor::Impl {
  explicit Impl(Project& p)
      : project(p),
        db(p.db()),
        writer(db),
        begin(db.prepare("BEGIN IMMEDIATE")),
        commit(db.prepare("COMMIT")),
        rollback(db.prepare("ROLLBACK")),
        selEvent(db.prepare(
            "SELECT event_id, position_id, trap_id, frame, kind, confidence, status, "
            "origin_proposal, proposed_frame, last_seq FROM current_events WHERE event_id = ?1")),
        updEvent(db.prepare("UPDATE current_events SET frame = ?2, status = ?3, last_seq = ?4 "
                            "WHERE event_id = ?1")),
        insEvent(db.prepare(kInsertEventSql)),
        delEvent(db.prepare("DELETE FROM current_events WHERE event_id = ?1")),
        duplicate(db.prepare(
            "SELECT event_id FROM current_events WHERE position_id = ?1 AND trap_id = ?2 AND "
            "frame = ?3 AND kind = ?4 AND status != 'rejected' AND event_id != ?5 LIMIT 1")),
        trapExists(db.prepare("SELECT 1 FROM traps WHERE position_id = ?1 AND trap_id = ?2")),
        frameCount(db.prepare("SELECT frame_count, name FROM positions WHERE id = ?1")),
        signedCover(db.prepare(
            "SELECT id, scope_name, person FROM signoffs WHERE revoked_seq IS NULL AND "
            "(scope_kind = 'experiment' OR (scope_kind = 'position' AND position_id = ?1) OR "
            "(scope_kind = 'trap' AND position_id = ?1 AND trap_id = ?2)) ORDER BY id LIMIT 1")),
        selOutcome(db.prepare(
            "SELECT outcome FROM outcome_overrides WHERE position_id = ?1 AND trap_id = ?2 AND "
            "mother = ?3")),
        putOutcome(db.prepare(
            "INSERT INTO outcome_overrides(position_id, trap_id, mother, outcome, last_seq) "
            "VALUES (?1,?2,?3,?4,?5) ON CONFLICT(position_id, trap_id, mother) DO UPDATE SET "
            "outcome = excluded.outcome, last_seq = excluded.last_seq")),
        delOutcome(
            db.prepare("DELETE FROM outcome_overrides WHERE position_id = ?1 AND trap_id = ?2 AND "
                       "mother = ?3")),
        history(db) {}

  Project& project;
  Database& db;
  JournalWriter writer;
  Statement begin, commit, rollback;
  Statement selEvent, updEvent, insEvent, delEvent, duplicate, trapExists, frameCount, signedCover,
      selOutcome, putOutcome, delOutcome;
  UndoHistory history;
  Listener listener;

  // Positions never change once made; the cache is refilled when it misses
  // (a position added since).
  struct PositionInfo {
    int frameCount = 0;
    std::string name;
  };
  std::map<int, PositionInfo> positions;

  // BEGIN IMMEDIATE … COMMIT with statements prepared once (an edit is short
  // enough that preparing them each time shows); rolls back unless committed.
  class Txn {
   public:
    explicit Txn(Impl& m) : m_(m) { m_.begin.run(); }
    ~Txn() {
      if (done_) return;
      try {
        m_.rollback.run();
      } catch (...) {
      }
    }
    Txn(const Txn&) = delete;
    Txn& operator=(const Txn&) = delete;
    void commit() {
      m_.commit.run();
      done_ = true;
    }

   private:
    Impl& m_;
    bool done_ = false;
  };

  // ---- checks -------------------------------------------------------------

  void checkCaller(const Actor& by) {
    if (project.readOnly()) throw EditRefused(project.readOnlyReason());
    if (by.name.empty() || by.role.empty())
      throw EditRefused("an edit needs the name and role of the person making it");
  }

  const PositionInfo& position(int id) {
    if (const auto it = positions.find(id); it != positions.end()) return it->second;
    frameCount.bind(1, id);
    if (!frameCount.step()) {
      frameCount.reset();
      throw EditRefused(fmt::format("there is no position with id {}", id));
    }
    PositionInfo info{frameCount.integer(0), frameCount.text(1)};
    frameCount.reset();
    return positions.emplace(id, std::move(info)).first->second;
  }

  void checkTrap(const TrapRef& t) {
    const auto& info = position(t.position);
    trapExists.bind(1, t.position).bind(2, t.trap);
    const bool found = trapExists.step();
    trapExists.reset();
    if (!found) throw EditRefused(fmt::format("position '{}' has no trap {}", info.name, t.trap));
  }

  void checkFrame(int positionId, int frame) {
    const auto& info = position(positionId);
    if (frame < 0 || (info.frameCount > 0 && frame >= info.frameCount))
      throw EditRefused(fmt::format("frame {} is outside position '{}' (frames 0–{})", frame,
                                    info.name, info.frameCount - 1));
  }

  void checkNoDuplicate(const EventState& s, std::int64_t self) {
    duplicate.bind(1, s.position).bind(2, s.trap).bind(3, s.frame).bind(4, toString(s.kind));
    duplicate.bind(5, self);
    const bool found = duplicate.step();
    const auto other = found ? duplicate.int64(0) : 0;
    duplicate.reset();
    if (found)
      throw EditRefused(fmt::format("trap {} already has a {} at frame {} (event {})", s.trap,
                                    toString(s.kind), s.frame, other));
  }

  void checkUnsigned(const TrapRef& t) {
    signedCover.bind(1, t.position).bind(2, t.trap);
    if (signedCover.step()) {
      const auto msg = fmt::format(
          "trap {} of position '{}' is inside sign-off {} ({}, signed by {}); revoke it first",
          t.trap, position(t.position).name, signedCover.int64(0), signedCover.text(1),
          signedCover.text(2));
      signedCover.reset();
      throw EditRefused(msg);
    }
    signedCover.reset();
  }

  // ---- state access -------------------------------------------------------

  std::optional<CurrentEvent> loadEvent(std::int64_t id) {
    selEvent.bind(1, id);
    std::optional<CurrentEvent> out;
    if (selEvent.step()) {
      CurrentEvent e;
      e.event.id = selEvent.int64(0);
      e.event.position = selEvent.integer(1);
      e.event.trap = selEvent.integer(2);
      e.event.frame = selEvent.integer(3);
      e.event.kind = eventKindFromString(selEvent.text(4)).value_or(EventKind::Bud);
      e.event.confidence = selEvent.real(5);
      e.status = eventStatusFromString(selEvent.text(6)).value_or(EventStatus::Proposed);
      if (!selEvent.isNull(7)) e.originProposal = selEvent.int64(7);
      if (!selEvent.isNull(8)) e.proposedFrame = selEvent.integer(8);
      e.lastSeq = selEvent.int64(9);
      out = e;
    }
    selEvent.reset();
    return out;
  }

  CurrentEvent requireEvent(std::int64_t id) {
    auto e = loadEvent(id);
    if (!e) throw EditRefused(fmt::format("there is no event {}", id));
    return *e;
  }

  // `exists`: whether the row is there now (the caller has just read it).
  void storeEvent(std::int64_t id, const std::optional<EventState>& after, std::int64_t seq,
                  bool exists) {
    if (!after) {
      delEvent.bind(1, id).run();
      return;
    }
    if (exists) {
      updEvent.bind(1, id).bind(2, after->frame).bind(3, toString(after->status)).bind(4, seq);
      updEvent.run();
      return;
    }
    CurrentEvent e;
    e.event = {id, after->position, after->trap, after->frame, after->kind, 1.0};
    e.status = after->status;
    e.lastSeq = seq;
    bindEventRow(insEvent, e);
    insEvent.run();
  }

  std::optional<Outcome> loadOverride(const TenureKey& k) {
    selOutcome.bind(1, k.position).bind(2, k.trap).bind(3, k.mother);
    std::optional<Outcome> out;
    if (selOutcome.step()) out = outcomeFromString(selOutcome.text(0));
    selOutcome.reset();
    return out;
  }

  void storeOverride(const TenureKey& k, std::string_view afterJson, std::int64_t seq) {
    const auto j = nlohmann::json::parse(afterJson);
    if (j.at("override").get<bool>()) {
      putOutcome.bind(1, k.position).bind(2, k.trap).bind(3, k.mother);
      putOutcome.bind(4, j.at("outcome").get<std::string>()).bind(5, seq).run();
    } else {
      delOutcome.bind(1, k.position).bind(2, k.trap).bind(3, k.mother).run();
    }
  }

  // ---- writing ------------------------------------------------------------

  JournalEntry entry(const Actor& by, JournalAction action, std::string target, std::string before,
                     std::string after, std::string_view reason) {
    JournalEntry e;
    e.actor = by.name;
    e.role = by.role;
    e.action = action;
    e.target = std::move(target);
    e.before = std::move(before);
    e.after = std::move(after);
    e.reason = std::string(reason);
    return e;
  }

  Change finish(Txn& tx, const JournalEntry& e, std::vector<TrapRef> traps, std::string summary) {
    tx.commit();
    Change c{e.seq, e.action, std::move(traps), std::move(summary)};
    if (listener) listener(c);
    return c;
  }

  std::string where(const EventState& s) {
    return fmt::format("{} of '{}' trap {}", toString(s.kind), position(s.position).name, s.trap);
  }

  // One event edit: `decide` gives the state after (or throws EditRefused).
  template <typename Decide>
  Change eventEdit(const Actor& by, JournalAction action, std::int64_t id, std::string_view reason,
                   Decide decide) {
    checkCaller(by);
    Txn tx(*this);
    const auto current = requireEvent(id);
    const auto before = stateOf(current);
    const EventState after = decide(current);
    if (after == before) return Change{};
    checkUnsigned({before.position, before.trap});
    if (after.status != EventStatus::Rejected) {
      checkFrame(after.position, after.frame);
      checkNoDuplicate(after, id);
    }
    auto e =
        entry(by, action, toString(Target::event(id)), stateJson(before), stateJson(after), reason);
    writer.append(e);
    storeEvent(id, after, e.seq, true);
    std::string summary =
        after.frame != before.frame
            ? fmt::format("{} {}: frame {} → {} ({})", toString(action), where(after), before.frame,
                          after.frame, toString(after.status))
            : fmt::format("{} {} at frame {}: {} → {}", toString(action), where(after), after.frame,
                          toString(before.status), toString(after.status));
    return finish(tx, e, {{after.position, after.trap}}, std::move(summary));
  }

  // Undo or redo of entry `x`: the values are x's, swapped for undo.
  Change reverse(const Actor& by, bool isUndo, std::string_view reason) {
    checkCaller(by);
    Txn tx(*this);
    const auto tops = history.tops();
    const auto topSeq = isUndo ? tops.undo : tops.redo;
    if (!topSeq) return Change{};
    const auto x = readEntry(db, *topSeq);
    if (!x) throw StoreError(fmt::format("the journal names entry {}, which is missing", *topSeq));
    const auto target = parseTarget(x->target);
    if (!target) throw StoreError(fmt::format("entry {} has no valid target", x->seq));
    const std::string& from = isUndo ? x->after : x->before;
    const std::string& to = isUndo ? x->before : x->after;
    TrapRef trap;
    bool exists = false;
    if (target->kind == Target::Kind::Event) {
      const auto current = loadEvent(target->id);
      exists = current.has_value();
      if (stateJson(current ? std::optional(stateOf(*current)) : std::nullopt) != from)
        throw EditRefused(fmt::format("entry {}'s event has changed since; nothing to {}", x->seq,
                                      isUndo ? "undo" : "redo"));
      const auto s = parseEventState(from) ? parseEventState(from) : parseEventState(to);
      trap = {s->position, s->trap};
    } else {
      trap = {target->position, target->trap};
    }
    checkUnsigned(trap);
    auto e = entry(by, isUndo ? JournalAction::Undo : JournalAction::Redo,
                   toString(Target::entry(x->seq)), from, to, reason);
    writer.append(e);
    if (target->kind == Target::Kind::Event)
      storeEvent(target->id, parseEventState(to), e.seq, exists);
    else
      storeOverride({target->position, target->trap, target->mother}, to, e.seq);
    return finish(tx, e, {trap},
                  fmt::format("{} entry {} ({} {})", isUndo ? "undid" : "redid", x->seq,
                              toString(x->action), x->target));
  }
};

Editor::Editor(Project& project) : impl_(std::make_unique<Impl>(project)) {}
Editor::~Editor() = default;

void Editor::setListener(Listener l) { impl_->listener = std::move(l); }

Change Editor::accept(const Actor& by, std::int64_t id, std::string_view reason) {
  return impl_->eventEdit(by, JournalAction::Accept, id, reason, [](const CurrentEvent& c) {
    auto s = stateOf(c);
    if (c.fromProposal()) {
      s.frame = c.proposedFrame.value_or(s.frame);
      s.status = EventStatus::Accepted;
    } else {
      s.status = EventStatus::Added;
    }
    return s;
  });
}

Change Editor::reject(const Actor& by, std::int64_t id, std::string_view reason) {
  return impl_->eventEdit(by, JournalAction::Delete, id, reason, [](const CurrentEvent& c) {
    auto s = stateOf(c);
    s.status = EventStatus::Rejected;
    return s;
  });
}

Change Editor::move(const Actor& by, std::int64_t id, int frame, std::string_view reason) {
  return impl_->eventEdit(by, JournalAction::Move, id, reason, [&](const CurrentEvent& c) {
    auto s = stateOf(c);
    s.frame = frame;
    if (c.fromProposal())
      s.status = frame == c.proposedFrame ? EventStatus::Accepted : EventStatus::Moved;
    else
      s.status = EventStatus::Added;
    return s;
  });
}

Change Editor::add(const Actor& by, const TrapRef& trap, int frame, EventKind kind,
                   std::string_view reason) {
  auto& m = *impl_;
  m.checkCaller(by);
  Impl::Txn tx(m);
  m.checkTrap(trap);
  m.checkFrame(trap.position, frame);
  const EventState after{trap.position, trap.trap, frame, kind, EventStatus::Added};
  const std::int64_t id = -m.writer.nextSeq();
  m.checkNoDuplicate(after, id);
  m.checkUnsigned(trap);
  auto e = m.entry(by, JournalAction::Add, toString(Target::event(id)), "null", stateJson(after),
                   reason);
  m.writer.append(e);
  m.storeEvent(id, after, e.seq, false);
  return m.finish(tx, e, {trap},
                  fmt::format("added {} at frame {} (event {})", m.where(after), frame, id));
}

Change Editor::setOutcome(const Actor& by, const TenureKey& k, Outcome outcome,
                          std::string_view reason) {
  auto& m = *impl_;
  m.checkCaller(by);
  Impl::Txn tx(m);
  m.checkTrap({k.position, k.trap});
  const auto info = m.position(k.position);  // a copy: the cache may grow below
  std::vector<Event> counted;
  for (const auto& e : currentEvents(m.db, TrapRef{k.position, k.trap}))
    if (e.counts()) counted.push_back(e.event);
  const auto tenures = lineage::tenuresFromEvents(std::move(counted), info.frameCount).tenures;
  if (k.mother < 0 || k.mother >= static_cast<int>(tenures.size()))
    throw EditRefused(fmt::format("trap {} of '{}' has no mother {} (it has {})", k.trap, info.name,
                                  k.mother, tenures.size()));
  const Outcome derived = tenures[static_cast<std::size_t>(k.mother)].outcome;
  const auto current = m.loadOverride(k);
  if (current.value_or(derived) == outcome) return Change{};
  m.checkUnsigned({k.position, k.trap});
  auto e =
      m.entry(by, JournalAction::SetOutcome, toString(Target::tenure(k.position, k.trap, k.mother)),
              outcomeJson(current, derived), outcomeJson(outcome, derived), reason);
  m.writer.append(e);
  m.storeOverride(k, e.after, e.seq);
  return m.finish(
      tx, e, {{k.position, k.trap}},
      fmt::format("set outcome of mother {} in '{}' trap {}: {} → {}", k.mother, info.name, k.trap,
                  toString(current.value_or(derived)), toString(outcome)));
}

Change Editor::note(const Actor& by, const Target& target, std::string_view text,
                    std::string_view reason) {
  auto& m = *impl_;
  m.checkCaller(by);
  if (text.empty()) throw EditRefused("a note needs text");
  Impl::Txn tx(m);
  std::vector<TrapRef> traps;
  switch (target.kind) {
    case Target::Kind::Event: {
      const auto ev = m.requireEvent(target.id);
      traps.push_back({ev.event.position, ev.event.trap});
      break;
    }
    case Target::Kind::Tenure:
    case Target::Kind::Trap:
      m.checkTrap({target.position, target.trap});
      traps.push_back({target.position, target.trap});
      break;
    case Target::Kind::Position:
      m.position(target.position);
      break;
    case Target::Kind::Experiment:
      break;
    default:
      throw EditRefused("a note belongs to an event, tenure, trap, position or the experiment");
  }
  nlohmann::json after;
  after["text"] = std::string(text);
  auto e = m.entry(by, JournalAction::Note, toString(target), "null", after.dump(), reason);
  m.writer.append(e);
  return m.finish(tx, e, std::move(traps), fmt::format("noted on {}", toString(target)));
}

Change Editor::undo(const Actor& by, std::string_view reason) {
  return impl_->reverse(by, true, reason);
}

Change Editor::redo(const Actor& by, std::string_view reason) {
  return impl_->reverse(by, false, reason);
}

Change Editor::signOff(const Actor& by, const Scope& scope, SignMeaning meaning,
                       std::string_view reason) {
  auto& m = *impl_;
  m.checkCaller(by);
  Impl::Txn tx(m);
  if (scope.kind == Scope::Kind::Trap) m.checkTrap({scope.position, scope.trap});
  if (scope.kind == Scope::Kind::Position) m.position(scope.position);
  const auto positions = m.project.positions();
  SignOffValue v;
  v.scopeName = scopeName(scope, positions);
  v.meaning = meaning;
  v.digest = currentLifespansDigest(m.project, scope);
  for (const auto& so : signOffs(m.db))
    if (so.active() && so.scope == scope && so.person == by.name && so.role == by.role &&
        so.meaning == meaning && so.digest == v.digest)
      return Change{};
  auto e = m.entry(by, JournalAction::SignOff, idText(scope), "null", signOffJson(v), reason);
  m.writer.append(e);
  auto ins = m.db.prepare(
      "INSERT INTO signoffs(id, scope_kind, position_id, trap_id, scope_name, person, role, "
      "meaning, digest, utc) VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10)");
  ins.bind(1, e.seq).bind(2, toString(scope.kind));
  if (scope.kind == Scope::Kind::Experiment)
    ins.bindNull(3);
  else
    ins.bind(3, scope.position);
  if (scope.kind == Scope::Kind::Trap)
    ins.bind(4, scope.trap);
  else
    ins.bindNull(4);
  ins.bind(5, v.scopeName).bind(6, by.name).bind(7, by.role).bind(8, toString(meaning));
  ins.bind(9, v.digest).bind(10, e.utc).run();
  std::vector<TrapRef> traps;
  for (const auto& t : m.project.traps())
    if (scope.covers({t.position, t.trap})) traps.push_back({t.position, t.trap});
  return m.finish(
      tx, e, std::move(traps),
      fmt::format("{} {} as {} (sign-off {})", toString(meaning), v.scopeName, by.role, e.seq));
}

Change Editor::revoke(const Actor& by, std::int64_t id, std::string_view reason) {
  auto& m = *impl_;
  m.checkCaller(by);
  if (reason.empty()) throw EditRefused("revoking a sign-off needs a reason");
  Impl::Txn tx(m);
  std::optional<SignOffRecord> so;
  for (auto& r : signOffs(m.db))
    if (r.id == id) so = r;
  if (!so) throw EditRefused(fmt::format("there is no sign-off {}", id));
  if (!so->active())
    throw EditRefused(
        fmt::format("sign-off {} was already revoked (entry {})", id, *so->revokedSeq));
  auto e = m.entry(by, JournalAction::Revoke, toString(Target::signOff(id)),
                   std::string(kActiveJson), std::string(kRevokedJson), reason);
  m.writer.append(e);
  m.db.prepare("UPDATE signoffs SET revoked_seq = ?2 WHERE id = ?1")
      .bind(1, id)
      .bind(2, e.seq)
      .run();
  std::vector<TrapRef> traps;
  for (const auto& t : m.project.traps())
    if (so->scope.covers({t.position, t.trap})) traps.push_back({t.position, t.trap});
  return m.finish(tx, e, std::move(traps),
                  fmt::format("revoked sign-off {} ({})", id, so->scopeName));
}

std::optional<JournalEntry> Editor::nextUndo() {
  const auto t = impl_->history.tops().undo;
  return t ? readEntry(impl_->db, *t) : std::nullopt;
}

std::optional<JournalEntry> Editor::nextRedo() {
  const auto t = impl_->history.tops().redo;
  return t ? readEntry(impl_->db, *t) : std::nullopt;
}

}  // namespace budledger::store
