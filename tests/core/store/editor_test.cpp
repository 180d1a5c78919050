// Every edit as: check state; do; check; undo; check same as before; redo;
// check (style.md, "Edits, undo and the journal").
#include "core/store/editor.h"

#include <gtest/gtest.h>

#include "core/store/lifespans.h"
#include "core/store/materialised.h"
#include "core/store/replay.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

using testing::kPi;
using testing::kTech;

// The decision-relevant state: events without their last-entry bookkeeping,
// and outcome overrides' values.
struct Visible {
  std::map<std::int64_t, EventState> events;
  std::map<TenureKey, Outcome> outcomes;
  bool operator==(const Visible&) const = default;
};

class EditorTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = testing::scratchDir(::testing::UnitTest::GetInstance()->current_test_info()->name());
    project_ = std::make_unique<Project>(Project::create((dir_ / "p.budledger").string()));
    fx_ = testing::makeFixture(*project_, {.positions = 1, .traps = 3, .frames = 120});
    editor_ = std::make_unique<Editor>(*project_);
  }
  void TearDown() override {
    editor_.reset();
    project_.reset();
    std::filesystem::remove_all(dir_);
  }

  Visible visible() {
    Visible v;
    for (const auto& e : currentEvents(project_->db())) v.events[e.event.id] = stateOf(e);
    for (const auto& [k, o] : outcomeOverrides(project_->db())) v.outcomes[k] = o.outcome;
    return v;
  }
  std::int64_t entries() { return journalHead(project_->db()).seq; }
  CurrentEvent event(std::int64_t id) { return *currentEvent(project_->db(), id); }
  // First proposal of `kind` in trap `trap`.
  CurrentEvent first(EventKind kind, int trap = 0) {
    for (const auto& e : currentEvents(project_->db(), TrapRef{fx_.positions[0], trap}))
      if (e.event.kind == kind) return e;
    ADD_FAILURE() << "fixture has no such event";
    return {};
  }
  void expectReplayMatches() {
    auto& db = project_->db();
    const auto r = replay(readJournal(db), loadReplaySources(db));
    ASSERT_FALSE(r.problem) << r.problem->seq << ": " << r.problem->what;
    EXPECT_TRUE(sameMaterialised(r.state, readState(db)));
  }
  // do; check; undo; check same as before; redo; check
  template <typename Do, typename Check>
  void roundTrip(Do doIt, Check check) {
    const auto before = visible();
    const auto n = entries();
    const Change c = doIt();
    ASSERT_TRUE(c.recorded());
    EXPECT_EQ(c.seq, n + 1);
    EXPECT_FALSE(c.traps.empty());
    check();
    const auto after = visible();
    EXPECT_FALSE(after == before);
    ASSERT_TRUE(editor_->undo(kTech).recorded());
    EXPECT_TRUE(visible() == before);
    ASSERT_TRUE(editor_->redo(kTech).recorded());
    EXPECT_TRUE(visible() == after);
    check();
    EXPECT_EQ(entries(), n + 3);
    expectReplayMatches();
  }

  std::filesystem::path dir_;
  std::unique_ptr<Project> project_;
  testing::Fixture fx_;
  std::unique_ptr<Editor> editor_;
};

TEST_F(EditorTest, FixtureStartsAsProposalsWithOneJournalEntry) {
  EXPECT_EQ(entries(), 1);  // the engine run
  for (const auto& e : currentEvents(project_->db())) {
    EXPECT_EQ(e.status, EventStatus::Proposed);
    EXPECT_EQ(e.originProposal, e.event.id);
  }
  expectReplayMatches();
}

TEST_F(EditorTest, AcceptRoundTrip) {
  const auto bud = first(EventKind::Bud);
  roundTrip([&] { return editor_->accept(kTech, bud.event.id, "clear bud"); },
            [&] {
              EXPECT_EQ(event(bud.event.id).status, EventStatus::Accepted);
              EXPECT_EQ(event(bud.event.id).event.frame, bud.event.frame);
            });
  const auto e = readEntry(project_->db(), 2);
  ASSERT_TRUE(e);
  EXPECT_EQ(e->action, JournalAction::Accept);
  EXPECT_EQ(e->actor, "tech01");
  EXPECT_EQ(e->role, "technician");
  EXPECT_EQ(e->reason, "clear bud");
  // Computer-generated UTC time with milliseconds (ISO 8601), not typed by anyone.
  ASSERT_EQ(e->utc.size(), 24u);
  EXPECT_EQ(e->utc[10], 'T');
  EXPECT_EQ(e->utc[19], '.');
  EXPECT_EQ(e->utc.back(), 'Z');
  EXPECT_EQ(e->target, "event:" + std::to_string(bud.event.id));
  EXPECT_NE(e->before.find("\"status\":\"proposed\""), std::string::npos);
  EXPECT_NE(e->after.find("\"status\":\"accepted\""), std::string::npos);
}

TEST_F(EditorTest, MoveRoundTripAndMoveBackIsAccepted) {
  const auto sep = first(EventKind::Separation);
  roundTrip([&] { return editor_->move(kTech, sep.event.id, sep.event.frame + 2); },
            [&] {
              EXPECT_EQ(event(sep.event.id).status, EventStatus::Moved);
              EXPECT_EQ(event(sep.event.id).event.frame, sep.event.frame + 2);
              EXPECT_EQ(event(sep.event.id).proposedFrame, sep.event.frame);
            });
  ASSERT_TRUE(editor_->move(kTech, sep.event.id, sep.event.frame).recorded());
  EXPECT_EQ(event(sep.event.id).status, EventStatus::Accepted);
}

TEST_F(EditorTest, DeleteRoundTripChangesTheDivisionCount) {
  const auto sep = first(EventKind::Separation);
  const Scope trap = Scope::ofTrap(fx_.positions[0], 0);
  const int divisionsBefore = currentTenures(*project_, trap).at(0).divisions;
  roundTrip([&] { return editor_->reject(kTech, sep.event.id, "daughter only passing by"); },
            [&] {
              EXPECT_EQ(event(sep.event.id).status, EventStatus::Rejected);
              EXPECT_EQ(currentTenures(*project_, trap).at(0).divisions, divisionsBefore - 1);
            });
}

TEST_F(EditorTest, AddRoundTripKeepsTheSameId) {
  const TrapRef trap{fx_.positions[0], 1};
  std::int64_t id = 0;
  roundTrip(
      [&] {
        auto c = editor_->add(kTech, trap, 117, EventKind::Washout, "mother flushed out");
        id = -c.seq;
        return c;
      },
      [&] {
        const auto e = event(id);
        EXPECT_EQ(e.status, EventStatus::Added);
        EXPECT_EQ(e.event.frame, 117);
        EXPECT_FALSE(e.originProposal);
        EXPECT_DOUBLE_EQ(e.event.confidence, 1.0);
      });
  // Added events can be moved and deleted like any other, and accepted back.
  ASSERT_TRUE(editor_->move(kTech, id, 116).recorded());
  EXPECT_EQ(event(id).status, EventStatus::Added);
  ASSERT_TRUE(editor_->reject(kTech, id).recorded());
  ASSERT_TRUE(editor_->accept(kTech, id).recorded());
  EXPECT_EQ(event(id).status, EventStatus::Added);
  expectReplayMatches();
}

TEST_F(EditorTest, SetOutcomeRoundTrip) {
  const TenureKey mother{fx_.positions[0], 2, 0};
  const Scope trap = Scope::ofTrap(mother.position, mother.trap);
  const Outcome derived = currentTenures(*project_, trap).at(0).outcome;
  const Outcome wanted = derived == Outcome::Death ? Outcome::Washout : Outcome::Death;
  roundTrip([&] { return editor_->setOutcome(kTech, mother, wanted, "dead cell flushed"); },
            [&] { EXPECT_EQ(currentTenures(*project_, trap).at(0).outcome, wanted); });
  // Setting what already stands records nothing.
  const auto n = entries();
  EXPECT_FALSE(editor_->setOutcome(kTech, mother, wanted).recorded());
  EXPECT_EQ(entries(), n);
  EXPECT_THROW(editor_->setOutcome(kTech, {mother.position, 2, 5}, wanted), EditRefused);
}

TEST_F(EditorTest, CallsThatChangeNothingAreNotRecorded) {
  const auto bud = first(EventKind::Bud);
  ASSERT_TRUE(editor_->accept(kTech, bud.event.id).recorded());
  const auto n = entries();
  EXPECT_FALSE(editor_->accept(kTech, bud.event.id).recorded());
  EXPECT_FALSE(editor_->move(kTech, bud.event.id, bud.event.frame).recorded());
  ASSERT_TRUE(editor_->reject(kTech, bud.event.id).recorded());
  EXPECT_FALSE(editor_->reject(kTech, bud.event.id).recorded());
  EXPECT_EQ(entries(), n + 1);
}

TEST_F(EditorTest, RefusalsWriteNothing) {
  const auto bud = first(EventKind::Bud);
  const auto n = entries();
  EXPECT_THROW(editor_->accept(kTech, 999999), EditRefused);
  EXPECT_THROW(editor_->move(kTech, bud.event.id, 120), EditRefused);  // frames 0–119
  EXPECT_THROW(editor_->move(kTech, bud.event.id, -1), EditRefused);
  EXPECT_THROW(editor_->add(kTech, {fx_.positions[0], 42}, 5, EventKind::Bud), EditRefused);
  EXPECT_THROW(editor_->add(kTech, {fx_.positions[0], 0}, bud.event.frame, EventKind::Bud),
               EditRefused);  // already a bud there
  EXPECT_THROW(editor_->accept(Actor{"", "technician"}, bud.event.id), EditRefused);
  EXPECT_THROW(editor_->note(kTech, Target::experiment(), ""), EditRefused);
  EXPECT_EQ(entries(), n);
  EXPECT_FALSE(editor_->undo(kTech).recorded());  // nothing to undo yet
}

TEST_F(EditorTest, NewEditClearsRedoAndNotesAreNotUndone) {
  const auto bud = first(EventKind::Bud);
  const auto sep = first(EventKind::Separation);
  ASSERT_TRUE(editor_->accept(kTech, bud.event.id).recorded());
  ASSERT_TRUE(editor_->undo(kTech).recorded());
  ASSERT_TRUE(editor_->nextRedo());
  ASSERT_TRUE(editor_->reject(kTech, sep.event.id).recorded());
  EXPECT_FALSE(editor_->nextRedo());
  EXPECT_FALSE(editor_->redo(kTech).recorded());
  ASSERT_TRUE(editor_->note(kTech, Target::event(sep.event.id), "two cells overlap").recorded());
  const auto undone = editor_->undo(kTech);
  ASSERT_TRUE(undone.recorded());
  EXPECT_EQ(event(sep.event.id).status, EventStatus::Proposed);  // the note was skipped
  expectReplayMatches();
}

TEST_F(EditorTest, ListenerHearsEachCommittedChange) {
  std::vector<Change> heard;
  editor_->setListener([&](const Change& c) { heard.push_back(c); });
  const auto bud = first(EventKind::Bud, 1);
  editor_->accept(kTech, bud.event.id);
  editor_->accept(kTech, bud.event.id);  // no change, not heard
  editor_->move(kTech, bud.event.id, bud.event.frame + 1);
  ASSERT_EQ(heard.size(), 2u);
  EXPECT_EQ(heard[0].action, JournalAction::Accept);
  ASSERT_EQ(heard[1].traps.size(), 1u);
  EXPECT_EQ(heard[1].traps[0], (TrapRef{fx_.positions[0], 1}));
  EXPECT_NE(heard[1].summary.find("frame"), std::string::npos);
}

TEST_F(EditorTest, SignedScopeRefusesEditsUntilRevoked) {
  const auto bud = first(EventKind::Bud, 0);
  const auto other = first(EventKind::Bud, 1);
  const auto so = editor_->signOff(kPi, Scope::ofTrap(fx_.positions[0], 0), SignMeaning::Approved,
                                   "counts checked");
  ASSERT_TRUE(so.recorded());
  EXPECT_FALSE(
      editor_->signOff(kPi, Scope::ofTrap(fx_.positions[0], 0), SignMeaning::Approved).recorded());
  EXPECT_THROW(editor_->accept(kTech, bud.event.id), EditRefused);
  EXPECT_THROW(editor_->add(kTech, {fx_.positions[0], 0}, 1, EventKind::Arrival), EditRefused);
  EXPECT_TRUE(editor_->accept(kTech, other.event.id).recorded());  // another trap
  ASSERT_TRUE(editor_->note(kTech, Target::event(bud.event.id), "looks right").recorded());
  EXPECT_THROW(editor_->revoke(kPi, so.seq, ""), EditRefused);  // a reason is required
  ASSERT_TRUE(editor_->revoke(kPi, so.seq, "recount requested").recorded());
  EXPECT_THROW(editor_->revoke(kPi, so.seq, "again"), EditRefused);
  EXPECT_TRUE(editor_->accept(kTech, bud.event.id).recorded());
  expectReplayMatches();
}

TEST_F(EditorTest, UndoIsRefusedInsideASignedScope) {
  const auto bud = first(EventKind::Bud, 0);
  ASSERT_TRUE(editor_->accept(kTech, bud.event.id).recorded());
  ASSERT_TRUE(
      editor_->signOff(kPi, Scope::ofPosition(fx_.positions[0]), SignMeaning::Reviewed).recorded());
  EXPECT_THROW(editor_->undo(kTech), EditRefused);
  EXPECT_EQ(event(bud.event.id).status, EventStatus::Accepted);
}

}  // namespace
}  // namespace budledger::store
