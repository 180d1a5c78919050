// Re-analysis: decisions carry over to a new run's proposals by matching
// (same position, trap and kind, frame within ±2); what cannot be carried is
// listed for review and kept, never dropped.
#include "core/store/carry_over.h"

#include <gtest/gtest.h>

#include "core/store/editor.h"
#include "core/store/engine_run_entry.h"
#include "core/store/materialised.h"
#include "core/store/replay.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

CurrentEvent decided(std::int64_t id, int frame, EventKind kind, EventStatus status,
                     std::optional<int> proposed = std::nullopt) {
  CurrentEvent e;
  e.event = {id, 1, 0, frame, kind, 0.9};
  e.status = status;
  if (id > 0) {
    e.originProposal = id;
    e.proposedFrame = proposed.value_or(frame);
  }
  return e;
}

Event proposal(std::int64_t id, int frame, EventKind kind) { return {id, 1, 0, frame, kind, 0.7}; }

TEST(CarryOver, MatchesWithinTwoFramesAndKeepsThePersonsFrame) {
  const auto r = carryOver({decided(1, 50, EventKind::Bud, EventStatus::Accepted)},
                           {proposal(10, 52, EventKind::Bud)});
  ASSERT_EQ(r.carried.size(), 1u);
  EXPECT_EQ(r.carried[0], (std::pair<std::int64_t, std::int64_t>{1, 10}));
  const auto heir = inherit(decided(1, 50, EventKind::Bud, EventStatus::Accepted),
                            proposal(10, 52, EventKind::Bud), 9);
  EXPECT_EQ(heir.event.frame, 50);
  EXPECT_EQ(heir.status, EventStatus::Moved);
  EXPECT_EQ(heir.proposedFrame, 52);
  EXPECT_EQ(heir.originProposal, 10);
  EXPECT_EQ(inherit(decided(1, 50, EventKind::Bud, EventStatus::Accepted),
                    proposal(10, 50, EventKind::Bud), 9)
                .status,
            EventStatus::Accepted);
}

TEST(CarryOver, ThreeFramesOffOrAnotherKindDoesNotMatch) {
  const auto r = carryOver({decided(1, 50, EventKind::Bud, EventStatus::Accepted),
                            decided(2, 70, EventKind::Separation, EventStatus::Rejected)},
                           {proposal(10, 53, EventKind::Bud), proposal(11, 70, EventKind::Bud)});
  EXPECT_TRUE(r.carried.empty());
  EXPECT_EQ(r.unmatched, (std::vector<std::int64_t>{1, 2}));
}

TEST(CarryOver, AMovedDecisionMatchesNearEitherFrame) {
  // Proposed at 40, moved by a person to 45; the new engine now says 46.
  const auto d = decided(1, 45, EventKind::Separation, EventStatus::Moved, 40);
  auto r = carryOver({d}, {proposal(10, 46, EventKind::Separation)});
  ASSERT_EQ(r.carried.size(), 1u);
  EXPECT_EQ(inherit(d, proposal(10, 46, EventKind::Separation), 3).event.frame, 45);
  // … or still says 41.
  r = carryOver({d}, {proposal(10, 41, EventKind::Separation)});
  EXPECT_EQ(r.carried.size(), 1u);
}

TEST(CarryOver, OneToOneClosestFirst) {
  const auto r = carryOver({decided(1, 50, EventKind::Bud, EventStatus::Accepted),
                            decided(2, 52, EventKind::Bud, EventStatus::Rejected)},
                           {proposal(10, 52, EventKind::Bud)});
  ASSERT_EQ(r.carried.size(), 1u);
  EXPECT_EQ(r.carried[0].first, 2);  // distance 0 beats distance 2
  EXPECT_EQ(r.unmatched, (std::vector<std::int64_t>{1}));
}

TEST(CarryOver, UndecidedProposalsAndDeletedAdditionsCarryNothing) {
  const auto r = carryOver({decided(1, 50, EventKind::Bud, EventStatus::Proposed),
                            decided(-7, 60, EventKind::Bud, EventStatus::Rejected)},
                           {proposal(10, 50, EventKind::Bud), proposal(11, 60, EventKind::Bud)});
  EXPECT_TRUE(r.carried.empty());
  EXPECT_TRUE(r.unmatched.empty());
}

TEST(CarryOver, AnAddedEventFoundByTheNewRunBecomesItsProposal) {
  const auto r = carryOver({decided(-7, 60, EventKind::Death, EventStatus::Added)},
                           {proposal(11, 61, EventKind::Death)});
  ASSERT_EQ(r.carried.size(), 1u);
  EXPECT_EQ(r.carried[0], (std::pair<std::int64_t, std::int64_t>{-7, 11}));
}

class ReanalysisTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = testing::scratchDir(::testing::UnitTest::GetInstance()->current_test_info()->name());
    project_ = std::make_unique<Project>(Project::create((dir_ / "p.budledger").string()));
    fx_ = testing::makeFixture(*project_, {.positions = 2, .traps = 2, .frames = 100});
    editor_ = std::make_unique<Editor>(*project_);
  }
  void TearDown() override {
    editor_.reset();
    project_.reset();
    std::filesystem::remove_all(dir_);
  }
  std::vector<CurrentEvent> trapEvents(int position, int trap) {
    return currentEvents(project_->db(), TrapRef{position, trap});
  }
  // The run's proposals, each one frame later, except for those `drop` says.
  template <typename Drop>
  std::vector<Event> shifted(int position, Drop drop) {
    std::vector<Event> out;
    for (const auto& e : project_->proposals(fx_.run))
      if (e.position == position && !drop(e)) {
        Event n = e;
        n.id = 0;
        n.frame += 1;
        out.push_back(n);
      }
    return out;
  }
  std::filesystem::path dir_;
  std::unique_ptr<Project> project_;
  testing::Fixture fx_;
  std::unique_ptr<Editor> editor_;
};

TEST_F(ReanalysisTest, DecisionsFollowTheNewProposalsAndTheRestIsListed) {
  const int pos = fx_.positions[0];
  const auto events = trapEvents(pos, 0);
  ASSERT_GE(events.size(), 4u);
  const auto accepted = events[0];
  const auto rejected = events[1];
  const auto moved = events[2];
  const auto lost = events[3];  // the new run will not propose it
  editor_->accept(testing::kTech, accepted.event.id);
  editor_->reject(testing::kTech, rejected.event.id);
  editor_->move(testing::kTech, moved.event.id, moved.event.frame - 1);
  editor_->accept(testing::kTech, lost.event.id);
  const auto added = editor_->add(testing::kTech, {pos, 1}, 97, EventKind::Washout);
  const auto otherPosition = currentEvents(project_->db(), fx_.positions[1]);

  const auto run2 =
      project_->addEngineRun({0, "", "test-engine 2", "{}", "digest"},
                             shifted(pos, [&](const Event& e) { return e.id == lost.event.id; }),
                             {.positions = {pos}, .by = testing::kTech, .reason = "new engine"});

  const auto now = trapEvents(pos, 0);
  auto find = [&](int frame, EventKind kind) -> const CurrentEvent* {
    for (const auto& e : now)
      if (e.event.frame == frame && e.event.kind == kind && e.event.id != lost.event.id) return &e;
    return nullptr;
  };
  const auto* a = find(accepted.event.frame, accepted.event.kind);
  ASSERT_TRUE(a);
  EXPECT_EQ(a->status, EventStatus::Moved);  // the person's frame, the new proposal one later
  EXPECT_NE(a->event.id, accepted.event.id);
  const auto* r = find(rejected.event.frame + 1, rejected.event.kind);
  ASSERT_TRUE(r);
  EXPECT_EQ(r->status, EventStatus::Rejected);
  const auto* m = find(moved.event.frame - 1, moved.event.kind);
  ASSERT_TRUE(m);
  EXPECT_EQ(m->status, EventStatus::Moved);

  // The decision without a match is kept and listed, not dropped.
  const auto keptLost = currentEvent(project_->db(), lost.event.id);
  ASSERT_TRUE(keptLost);
  EXPECT_EQ(keptLost->status, EventStatus::Accepted);
  const auto review = reviewItems(project_->db());
  ASSERT_EQ(review.size(), 1u);
  EXPECT_EQ(review[0].run, run2);
  EXPECT_EQ(review[0].eventId, lost.event.id);

  // An added event the new run did not find stays as it was.
  EXPECT_EQ(currentEvent(project_->db(), -added.seq)->status, EventStatus::Added);
  // The other position was not re-analysed: untouched.
  EXPECT_TRUE(currentEvents(project_->db(), fx_.positions[1]) == otherPosition);
  // A fresh undo history.
  EXPECT_FALSE(editor_->nextUndo());

  const auto head = readEntry(project_->db(), journalHead(project_->db()).seq);
  ASSERT_TRUE(head);
  EXPECT_EQ(head->action, JournalAction::EngineRun);
  EXPECT_EQ(head->reason, "new engine");
  const auto v = parseEngineRunJson(head->after);
  EXPECT_EQ(v.carry.unmatched, (std::vector<std::int64_t>{lost.event.id}));
  EXPECT_EQ(v.carry.carried.size(), 3u);

  const auto re = replay(readJournal(project_->db()), loadReplaySources(project_->db()));
  ASSERT_FALSE(re.problem) << re.problem->what;
  EXPECT_TRUE(sameMaterialised(re.state, readState(project_->db())));
}

TEST_F(ReanalysisTest, RefusedInsideASignOffAndWritesNothing) {
  const int pos = fx_.positions[0];
  ASSERT_TRUE(
      editor_->signOff(testing::kPi, Scope::ofTrap(pos, 1), SignMeaning::Approved).recorded());
  const auto before = journalHead(project_->db());
  EXPECT_THROW(project_->addEngineRun({0, "", "e", "{}", ""},
                                      shifted(pos, [](const Event&) { return false; }),
                                      {.positions = {pos}, .by = testing::kTech, .reason = ""}),
               StoreError);
  EXPECT_EQ(journalHead(project_->db()).seq, before.seq);
  EXPECT_EQ(project_->latestRun()->id, fx_.run);
  // The other position may be re-analysed.
  EXPECT_NO_THROW(project_->addEngineRun(
      {0, "", "e", "{}", ""}, shifted(fx_.positions[1], [](const Event&) { return false; }),
      {.positions = {fx_.positions[1]}, .by = testing::kTech, .reason = ""}));
}

}  // namespace
}  // namespace budledger::store
