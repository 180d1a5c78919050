// Replay is a pure function of (proposals, journal): replaying from scratch
// gives exactly the live, materialised state, after any sequence of edits;
// and replay names the first entry that does not fit the state it finds.
#include "core/store/replay.h"

#include <gtest/gtest.h>

#include <random>

#include "core/store/editor.h"
#include "core/store/engine_run_entry.h"
#include "core/store/materialised.h"
#include "core/store/undo_history.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

using testing::kPi;
using testing::kTech;

void expectReplayIsLive(Project& p, const char* when) {
  auto& db = p.db();
  const auto r = replay(readJournal(db), loadReplaySources(db));
  ASSERT_FALSE(r.problem) << when << ": entry " << r.problem->seq << ": " << r.problem->what;
  EXPECT_TRUE(sameMaterialised(r.state, readState(db))) << when;
  // The tops the Editor finds by walking back are those of the replayed stacks.
  const auto tops = UndoHistory(db).tops();
  EXPECT_EQ(tops.undo, r.state.undo.empty() ? std::nullopt : std::optional(r.state.undo.back()))
      << when;
  EXPECT_EQ(tops.redo, r.state.redo.empty() ? std::nullopt : std::optional(r.state.redo.back()))
      << when;
}

TEST(Replay, RandomEditStormReplaysToTheLiveState) {
  const auto dir = testing::scratchDir("replay_storm");
  {
    auto p = Project::create((dir / "p.budledger").string());
    // Durability is not what this test is about; spare the disk 400 fsyncs.
    p.db().exec("PRAGMA synchronous = OFF");
    const auto fx = testing::makeFixture(p, {.positions = 2, .traps = 4, .frames = 80, .seed = 7});
    Editor ed(p);
    std::mt19937 rng(20261201);  // fixed: the test must be reproducible
    auto pick = [&](auto& v) {
      return v[std::uniform_int_distribution<std::size_t>(0, v.size() - 1)(rng)];
    };
    int recorded = 0;
    int reanalyses = 0;
    for (int step = 0; step < 400; ++step) {
      const auto events = currentEvents(p.db());
      const auto e = pick(events);
      const int op = std::uniform_int_distribution<int>(0, 13)(rng);
      const int position = pick(fx.positions);
      const int trap = std::uniform_int_distribution<int>(0, 3)(rng);
      try {
        Change c;
        switch (op) {
          case 0:
          case 1:
            c = ed.accept(kTech, e.event.id);
            break;
          case 2:
            c = ed.reject(kTech, e.event.id);
            break;
          case 3:
          case 4:
            c = ed.move(kTech, e.event.id,
                        e.event.frame + std::uniform_int_distribution<int>(-3, 3)(rng));
            break;
          case 5:
            c = ed.add(kTech, {position, trap}, std::uniform_int_distribution<int>(0, 79)(rng),
                       kAllEventKinds[std::uniform_int_distribution<int>(0, 4)(rng)]);
            break;
          case 6:
            c = ed.setOutcome(kTech, {position, trap, 0},
                              static_cast<Outcome>(std::uniform_int_distribution<int>(0, 2)(rng)));
            break;
          case 7:
          case 8:
            c = ed.undo(kTech);
            break;
          case 9:
            c = ed.redo(kTech);
            break;
          case 10:
            c = ed.note(kTech, Target::trapOf(position, trap), "checked");
            break;
          case 11:
            c = ed.signOff(kPi, Scope::ofTrap(position, trap), SignMeaning::Reviewed);
            break;
          case 12: {
            const auto sos = signOffs(p.db());
            for (const auto& so : sos)
              if (so.active()) c = ed.revoke(kPi, so.id, "more to do");
            break;
          }
          case 13:
            if (step % 5 == 0) {
              // A re-analysis of one position: fresh proposals near the old ones.
              std::vector<Event> fresh;
              for (int t = 0; t < 4; ++t) {
                auto more = testing::plausibleProposals(position, t, 80, rng);
                fresh.insert(fresh.end(), more.begin(), more.end());
              }
              try {
                p.addEngineRun({0, "", "test-engine 2", "{}", "d"}, fresh,
                               {.positions = {position}, .by = kTech, .reason = "re-run"});
                ++reanalyses;
              } catch (const StoreError&) {
                // refused inside a sign-off: expected now and then
              }
            }
            break;
        }
        recorded += c.recorded();
      } catch (const EditRefused&) {
        // Refusals are part of the storm: they must leave no trace.
      }
      if (step % 20 == 19) expectReplayIsLive(p, "during the storm");
    }
    EXPECT_GT(recorded, 150);
    EXPECT_GT(reanalyses, 0);
    expectReplayIsLive(p, "after the storm");
    const auto live = readState(p.db());
    rebuildState(p.db());
    EXPECT_TRUE(sameMaterialised(readState(p.db()), live));
  }
  std::filesystem::remove_all(dir);
}

// Hand-made journals against the pure function.
class ReplayPure : public ::testing::Test {
 protected:
  void SetUp() override {
    Event a{101, 1, 0, 10, EventKind::Bud, 0.9};
    Event b{102, 1, 0, 14, EventKind::Separation, 0.8};
    src_.proposals[1] = {a, b};
    src_.positionNames[1] = "pos01";
    EngineRunValue v;
    v.run = 1;
    v.positions = {1};
    v.proposals = 2;
    v.digest = proposalsDigest(src_.proposals[1], src_.positionNames);
    add(JournalAction::EngineRun, "run:1", "null", engineRunJson(v));
  }
  JournalEntry& add(JournalAction a, std::string target, std::string before, std::string after) {
    JournalEntry e;
    e.seq = static_cast<std::int64_t>(entries_.size()) + 1;
    e.action = a;
    e.target = std::move(target);
    e.before = std::move(before);
    e.after = std::move(after);
    entries_.push_back(e);
    return entries_.back();
  }
  static std::string st(int frame, EventKind k, EventStatus s) {
    return stateJson(EventState{1, 0, frame, k, s});
  }
  ReplaySources src_;
  std::vector<JournalEntry> entries_;
};

TEST_F(ReplayPure, AppliesEditsAndUndo) {
  add(JournalAction::Move, "event:102", st(14, EventKind::Separation, EventStatus::Proposed),
      st(16, EventKind::Separation, EventStatus::Moved));
  add(JournalAction::Undo, "entry:2", entries_[1].after, entries_[1].before);
  add(JournalAction::Add, "event:-4", "null", st(30, EventKind::Death, EventStatus::Added));
  const auto r = replay(entries_, src_);
  ASSERT_FALSE(r.problem) << r.problem->what;
  EXPECT_EQ(r.state.events.at(102).event.frame, 14);
  EXPECT_EQ(r.state.events.at(102).status, EventStatus::Proposed);
  EXPECT_EQ(r.state.events.at(-4).status, EventStatus::Added);
  EXPECT_EQ(r.state.undo, (std::vector<std::int64_t>{4}));
  EXPECT_TRUE(r.state.redo.empty());  // the add, a new edit, cleared it
}

TEST_F(ReplayPure, NamesAnEntryWhoseBeforeDoesNotFit) {
  add(JournalAction::Accept, "event:101", st(10, EventKind::Bud, EventStatus::Proposed),
      st(10, EventKind::Bud, EventStatus::Accepted));
  add(JournalAction::Delete, "event:101", st(10, EventKind::Bud, EventStatus::Proposed),
      st(10, EventKind::Bud, EventStatus::Rejected));  // before should say accepted
  const auto r = replay(entries_, src_);
  ASSERT_TRUE(r.problem);
  EXPECT_EQ(r.problem->seq, 3);
  EXPECT_NE(r.problem->what.find("value before"), std::string::npos);
}

TEST_F(ReplayPure, NamesAnUndoThatIsNotOnTopOfTheStack) {
  add(JournalAction::Accept, "event:101", st(10, EventKind::Bud, EventStatus::Proposed),
      st(10, EventKind::Bud, EventStatus::Accepted));
  add(JournalAction::Accept, "event:102", st(14, EventKind::Separation, EventStatus::Proposed),
      st(14, EventKind::Separation, EventStatus::Accepted));
  add(JournalAction::Undo, "entry:2", entries_[1].after, entries_[1].before);
  const auto r = replay(entries_, src_);
  ASSERT_TRUE(r.problem);
  EXPECT_EQ(r.problem->seq, 4);
}

TEST_F(ReplayPure, NamesAnEditInsideAnActiveSignOff) {
  add(JournalAction::SignOff, "trap:1/0", "null",
      signOffJson({"trap:pos01/0", SignMeaning::Approved, "d"}));
  add(JournalAction::Accept, "event:101", st(10, EventKind::Bud, EventStatus::Proposed),
      st(10, EventKind::Bud, EventStatus::Accepted));
  auto r = replay(entries_, src_);
  ASSERT_TRUE(r.problem);
  EXPECT_EQ(r.problem->seq, 3);
  EXPECT_NE(r.problem->what.find("sign-off 2"), std::string::npos);
  // With a revocation in between, the same edit is fine.
  entries_.pop_back();
  add(JournalAction::Revoke, "signoff:2", std::string(kActiveJson), std::string(kRevokedJson));
  add(JournalAction::Accept, "event:101", st(10, EventKind::Bud, EventStatus::Proposed),
      st(10, EventKind::Bud, EventStatus::Accepted));
  r = replay(entries_, src_);
  EXPECT_FALSE(r.problem) << r.problem->what;
}

TEST_F(ReplayPure, NamesProposalsThatNoLongerMatchTheirDigest) {
  src_.proposals[1][0].frame = 11;
  const auto r = replay(entries_, src_);
  ASSERT_TRUE(r.problem);
  EXPECT_EQ(r.problem->seq, 1);
  EXPECT_NE(r.problem->what.find("digest"), std::string::npos);
}

TEST_F(ReplayPure, NamesAGapInTheSequence) {
  add(JournalAction::Note, "experiment", "null", R"({"text":"a"})");
  add(JournalAction::Note, "experiment", "null", R"({"text":"b"})");
  entries_.erase(entries_.begin() + 1);
  const auto r = replay(entries_, src_);
  ASSERT_TRUE(r.problem);
  EXPECT_EQ(r.problem->seq, 2);
}

}  // namespace
}  // namespace budledger::store
