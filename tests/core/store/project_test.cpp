#include "core/store/project.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "core/store/materialised.h"
#include "core/store/schema.h"
#include "core/store/verify.h"

namespace budledger::store {
namespace {

class ProjectTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = std::filesystem::temp_directory_path() /
           ("budledger_store_" + std::to_string(::testing::UnitTest::GetInstance()->random_seed()) +
            "_" + ::testing::UnitTest::GetInstance()->current_test_info()->name());
    std::filesystem::remove_all(dir_);
    std::filesystem::create_directories(dir_);
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }
  std::string file(const char* name) const { return (dir_ / name).string(); }
  std::filesystem::path dir_;
};

TEST_F(ProjectTest, CreateStoresSchemaVersionAndMetadata) {
  {
    auto p = Project::create(file("a.budledger"));
    p.setMeta("interval_min", "10");
  }
  auto p = Project::open(file("a.budledger"));
  EXPECT_EQ(p.meta("interval_min"), "10");
  EXPECT_TRUE(p.meta("created_utc").has_value());
  auto st = p.db().prepare("PRAGMA user_version");
  ASSERT_TRUE(st.step());
  EXPECT_EQ(st.integer(0), latestSchemaVersion());
}

TEST_F(ProjectTest, RefusesToOverwrite) {
  Project::create(file("a.budledger"));
  EXPECT_THROW(Project::create(file("a.budledger")), StoreError);
}

TEST_F(ProjectTest, RefusesForeignFiles) {
  { std::ofstream(file("not.budledger")) << "this is not sqlite at all, just text\n"; }
  EXPECT_THROW(Project::open(file("not.budledger")), StoreError);
  EXPECT_THROW(Project::open(file("missing.budledger")), StoreError);
}

TEST_F(ProjectTest, TrapsAndProposalsRoundTrip) {
  auto p = Project::create(file("a.budledger"));
  const int pos = p.addPosition({0, "pos01", "control", 240, 1000, 700});
  p.replaceTraps(pos, {{pos, 0, 0, 0, 50.5, 60.25, false}, {pos, 1, 0, 1, 150.0, 60.0, true}});
  Event e;
  e.position = pos;
  e.trap = 1;
  e.frame = 12;
  e.kind = EventKind::Separation;
  e.confidence = 0.875;
  const auto run = p.addEngineRun({0, "", "0.1.0", "{}", "abc"}, {e});
  EXPECT_GT(run, 0);
  const auto traps = p.traps(pos);
  ASSERT_EQ(traps.size(), 2u);
  EXPECT_DOUBLE_EQ(traps[0].y, 60.25);
  EXPECT_TRUE(traps[1].edge);
  const auto props = p.proposals();
  ASSERT_EQ(props.size(), 1u);
  EXPECT_EQ(props[0].kind, EventKind::Separation);
  EXPECT_DOUBLE_EQ(props[0].confidence, 0.875);
  EXPECT_GT(props[0].id, 0);
}

TEST_F(ProjectTest, ProposalConstraintRejectsBadConfidenceAtomically) {
  auto p = Project::create(file("a.budledger"));
  const int pos = p.addPosition({0, "pos01", "", 10, 10, 10});
  Event good;
  good.position = pos;
  Event bad = good;
  bad.confidence = 1.5;
  EXPECT_THROW(p.addEngineRun({0, "", "0.1.0", "{}", ""}, {good, bad}), StoreError);
  EXPECT_FALSE(p.latestRun().has_value());  // the run was rolled back whole
}

TEST_F(ProjectTest, RunsAreListedOldestFirst) {
  auto p = Project::create(file("a.budledger"));
  EXPECT_TRUE(p.runs().empty());
  const int a = p.addPosition({0, "pos01", "", 10, 10, 10});
  const int b = p.addPosition({0, "pos02", "", 10, 10, 10});
  RunRecording onlyA, onlyB;
  onlyA.positions = {a};
  onlyB.positions = {b};
  const auto first = p.addEngineRun({0, "", "0.1.0", "{}", "x"}, {}, onlyA);
  const auto second = p.addEngineRun({0, "", "0.1.1", "{}", "y"}, {}, onlyB);
  const auto runs = p.runs();
  ASSERT_EQ(runs.size(), 2u);
  EXPECT_EQ(runs[0].id, first);
  EXPECT_EQ(runs[1].id, second);
  EXPECT_EQ(runs[1].engineVersion, "0.1.1");
  EXPECT_EQ(runs[0].inputDigest, "x");
}

TEST_F(ProjectTest, MeasurementsRoundTrip) {
  auto p = Project::create(file("a.budledger"));
  const int pos = p.addPosition({0, "pos01", "", 10, 10, 10});
  const auto run = p.addEngineRun({0, "", "0.1.0", "{}", ""}, {});
  MeasurementRecord m;
  m.position = pos;
  m.trap = 3;
  m.frame = 7;
  m.occupancy = Occupancy::Budded;
  m.pBudded = 0.8;
  m.pSingle = 0.2;
  m.cellCount = 2;
  p.addMeasurements(run, {m});
  const auto back = p.measurements(run, pos, 3);
  ASSERT_EQ(back.size(), 1u);
  EXPECT_EQ(back[0].occupancy, Occupancy::Budded);
  EXPECT_DOUBLE_EQ(back[0].pBudded, 0.8);
  EXPECT_EQ(back[0].cellCount, 2);
}

TEST_F(ProjectTest, AFileFromBeforeTheJournalGetsItsRunsJournaled) {
  const auto path = file("old.budledger");
  {
    auto p = Project::create(path);
    const int pos = p.addPosition({0, "pos01", "", 50, 10, 10});
    p.replaceTraps(pos, {{pos, 0, 0, 0, 5, 5, false}});
  }
  {
    // What a version-1 file looks like: no journal tables, a run and its
    // proposals written straight into the version-1 tables.
    Database raw(path, Database::Access::ReadWrite);
    raw.exec(
        "DROP TABLE journal; DROP TABLE current_events; DROP TABLE outcome_overrides; "
        "DROP TABLE signoffs; DROP TABLE carry_over_review; "
        "DELETE FROM meta WHERE key = 'journal_head'; PRAGMA user_version = 1; "
        "INSERT INTO engine_runs(id, started_utc, engine_version, parameters_json, input_digest) "
        "VALUES (1, '2026-01-01T00:00:00.000Z', 'old', '{}', ''); "
        "INSERT INTO proposals(run_id, position_id, trap_id, frame, kind, confidence) VALUES "
        "(1, 1, 0, 5, 'bud', 0.9), (1, 1, 0, 9, 'separation', 0.8);");
  }
  auto p = Project::open(path);
  auto st = p.db().prepare("PRAGMA user_version");
  ASSERT_TRUE(st.step());
  EXPECT_EQ(st.integer(0), latestSchemaVersion());
  EXPECT_EQ(currentEvents(p.db()).size(), 2u);
  const auto report = verifyProject(p);
  EXPECT_TRUE(report.ok()) << report.problems.front();
  EXPECT_EQ(report.entries, 1);
}

TEST_F(ProjectTest, WritesAreRefusedWhenReadOnly) {
  Project::create(file("a.budledger"));
  auto p = Project::open(file("a.budledger"), Database::Access::ReadOnly);
  EXPECT_THROW(p.setMeta("k", "v"), StoreError);
  EXPECT_THROW(p.db().exec("INSERT INTO meta(key, value) VALUES ('k', 'v')"), StoreError);
}

}  // namespace
}  // namespace budledger::store
