// Verify catches a project changed behind BudLedger's back — one value
// edited, a row deleted, rows reordered, and more — and names the first
// broken entry; an untouched project verifies clean.
#include "core/store/verify.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include "core/store/editor.h"
#include "core/store/materialised.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

class TamperTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = new std::filesystem::path(testing::scratchDir("tamper"));
    auto p = Project::create(base());
    const auto fx = testing::makeFixture(p, {.positions = 1, .traps = 3, .frames = 90});
    Editor ed(p);
    const auto events = currentEvents(p.db(), fx.positions[0]);
    ed.accept(testing::kTech, events[0].event.id, "clear");                              // entry 2
    ed.move(testing::kTech, events[1].event.id, events[1].event.frame + 1);              // 3
    ed.reject(testing::kTech, events[2].event.id, "debris");                             // 4
    ed.add(testing::kTech, {fx.positions[0], 1}, 88, EventKind::Washout);                // 5
    ed.accept(testing::kTech, events[3].event.id);                                       // 6
    ed.signOff(testing::kPi, Scope::ofTrap(fx.positions[0], 2), SignMeaning::Approved);  // 7
    ed.note(testing::kTech, Target::experiment(), "end of the session");                 // 8
    untouched_ = new std::int64_t(events[5].event.id);
  }
  static void TearDownTestSuite() {
    std::filesystem::remove_all(*dir_);
    delete dir_;
    delete untouched_;
  }
  static std::string base() { return (*dir_ / "base.budledger").string(); }

  // A copy of the base project changed by `sql` through a plain connection,
  // as someone with the file and an SQLite shell could.
  VerifyReport tampered(const std::string& sql) {
    const auto copy = (*dir_ / (::testing::UnitTest::GetInstance()->current_test_info()->name() +
                                std::string(".budledger")))
                          .string();
    std::filesystem::copy_file(base(), copy, std::filesystem::copy_options::overwrite_existing);
    {
      Database raw(copy, Database::Access::ReadWrite);
      raw.exec("DROP TRIGGER journal_no_update; DROP TRIGGER journal_no_delete;");
      if (!sql.empty()) raw.exec(sql);
      raw.exec(
          "CREATE TRIGGER journal_no_update BEFORE UPDATE ON journal BEGIN SELECT RAISE(ABORT, "
          "'x'); END; CREATE TRIGGER journal_no_delete BEFORE DELETE ON journal BEGIN SELECT "
          "RAISE(ABORT, 'x'); END;");
    }
    auto p = Project::open(copy, Database::Access::ReadOnly);
    return verifyProject(p);
  }
  static std::string first(const VerifyReport& r) {
    return r.problems.empty() ? "" : r.problems[0];
  }

  static std::filesystem::path* dir_;
  static std::int64_t* untouched_;
};
std::filesystem::path* TamperTest::dir_ = nullptr;
std::int64_t* TamperTest::untouched_ = nullptr;

TEST_F(TamperTest, UntouchedProjectVerifies) {
  const auto r = tampered("");
  EXPECT_TRUE(r.ok()) << first(r);
  EXPECT_EQ(r.entries, 8);
  EXPECT_EQ(r.signOffsChecked, 1);
  EXPECT_EQ(r.head.substr(0, 2), "8:");
}

TEST_F(TamperTest, OneValueEdited) {
  const auto r = tampered("UPDATE journal SET reason = 'dust' WHERE seq = 4");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(first(r),
            "journal entry 4: its content does not match its hash (changed after it was "
            "written)");
}

TEST_F(TamperTest, OneValueEditedAndRehashed) {
  // Rewriting the hash of the changed entry breaks the link from the next one.
  auto p = Project::open(base(), Database::Access::ReadOnly);
  auto e = *readEntry(p.db(), 3);
  e.after = e.before;
  const auto forged = entryHash(e);
  const auto r = tampered(fmt::format(
      "UPDATE journal SET value_after = value_before, hash = '{}' WHERE seq = 3", forged));
  ASSERT_FALSE(r.ok());
  EXPECT_NE(first(r).find("journal entry 4: its link to entry 3 is broken"), std::string::npos)
      << first(r);
}

TEST_F(TamperTest, ARowDeleted) {
  const auto r = tampered("DELETE FROM journal WHERE seq = 5");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(first(r), "journal entry 5 is missing (the journal goes from 4 to 6)");
}

TEST_F(TamperTest, RowsReordered) {
  const auto r = tampered(
      "UPDATE journal SET seq = -3 WHERE seq = 3; UPDATE journal SET seq = 3 WHERE seq = 4; "
      "UPDATE journal SET seq = 4 WHERE seq = -3;");
  ASSERT_FALSE(r.ok());
  EXPECT_NE(first(r).find("journal entry 3:"), std::string::npos) << first(r);
}

TEST_F(TamperTest, TheLastEntryCutOff) {
  const auto r = tampered("DELETE FROM journal WHERE seq = 8");
  ASSERT_FALSE(r.ok());
  EXPECT_NE(first(r).find("recorded journal head"), std::string::npos) << first(r);
}

TEST_F(TamperTest, MaterialisedStateEdited) {
  const auto id = *untouched_;
  const auto r = tampered(
      fmt::format("UPDATE current_events SET status = 'accepted' WHERE event_id = {}", id));
  ASSERT_FALSE(r.ok());
  EXPECT_NE(first(r).find(fmt::format("current event {}: stored as", id)), std::string::npos)
      << first(r);
}

TEST_F(TamperTest, AProposalEdited) {
  const auto r =
      tampered(fmt::format("UPDATE proposals SET frame = frame + 1 WHERE id = {}", *untouched_));
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(first(r), "journal entry 1: the proposals of run 1 do not match their recorded digest");
}

TEST_F(TamperTest, SignedLifespansChangedThroughAnUnchainedTable) {
  // Shortening the movie moves every end-of-imaging tenure's last frame.
  const auto r = tampered("UPDATE positions SET frame_count = 80");
  ASSERT_FALSE(r.ok());
  EXPECT_NE(first(r).find("sign-off 7"), std::string::npos) << first(r);
}

TEST_F(TamperTest, GuardTriggersRemoved) {
  const auto copy = (*dir_ / "triggers.budledger").string();
  std::filesystem::copy_file(base(), copy, std::filesystem::copy_options::overwrite_existing);
  { Database(copy, Database::Access::ReadWrite).exec("DROP TRIGGER journal_no_delete"); }
  auto p = Project::open(copy, Database::Access::ReadOnly);
  const auto r = verifyProject(p);
  ASSERT_FALSE(r.ok());
  EXPECT_NE(first(r).find("append-only"), std::string::npos);
}

}  // namespace
}  // namespace budledger::store
