#include "core/store/merge.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include <tuple>

#include "core/store/editor.h"
#include "core/store/lifespans.h"
#include "core/store/materialised.h"
#include "core/store/verify.h"
#include "tests/core/store/fixture.h"

namespace budledger::store {
namespace {

using testing::kPi;
using testing::kTech;

// Events by what they mean, not by id: (position name, trap, frame, kind, status).
using Meaning = std::tuple<std::string, int, int, std::string, std::string>;
std::vector<Meaning> meanings(Project& p) {
  std::map<int, std::string> names;
  for (const auto& pos : p.positions()) names[pos.id] = pos.name;
  std::vector<Meaning> out;
  for (const auto& e : currentEvents(p.db()))
    out.emplace_back(names[e.event.position], e.event.trap, e.event.frame,
                     std::string(toString(e.event.kind)), std::string(toString(e.status)));
  std::sort(out.begin(), out.end());
  return out;
}

class MergeTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = testing::scratchDir(::testing::UnitTest::GetInstance()->current_test_info()->name());
    a_ = file("a.budledger");
    b_ = file("b.budledger");
    {
      auto p = Project::create(a_);
      p.setMeta(kMetaIntervalMin, "10");
      const auto fx =
          testing::makeFixture(p, {.positions = 1, .traps = 3, .seed = 1, .prefix = "west"});
      Editor ed(p);
      const auto ev = currentEvents(p.db(), fx.positions[0]);
      ed.accept(kTech, ev[0].event.id);
      ed.move(kTech, ev[1].event.id, ev[1].event.frame + 1);
      ed.add(kTech, {fx.positions[0], 1}, 100, EventKind::Washout);
      ed.undo(kTech);
      ed.redo(kTech);
      ed.setOutcome(kTech, {fx.positions[0], 2, 0}, Outcome::Washout);
      ed.signOff(kPi, Scope::ofTrap(fx.positions[0], 0), SignMeaning::Approved);
    }
    {
      auto p = Project::create(b_);
      p.setMeta(kMetaIntervalMin, "10");
      const auto fx =
          testing::makeFixture(p, {.positions = 1, .traps = 3, .seed = 2, .prefix = "east"});
      Editor ed(p);
      const auto ev = currentEvents(p.db(), fx.positions[0]);
      ed.reject(kTech, ev[2].event.id);
      ed.accept(kTech, ev[3].event.id);
      ed.note(kTech, Target::trapOf(fx.positions[0], 1), "debris upstream");
      std::vector<Event> again;
      for (auto e : p.proposals(fx.run)) {
        e.frame += 1;
        again.push_back(e);
      }
      p.addEngineRun({0, "", "test-engine 2", "{}", "d"}, again,
                     {.positions = {}, .by = kTech, .reason = "new engine"});
      ed.reject(kTech, currentEvents(p.db(), fx.positions[0])[0].event.id);
    }
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }
  std::string file(const char* name) { return (dir_ / name).string(); }
  std::filesystem::path dir_;
  std::string a_, b_;
};

TEST_F(MergeTest, KeepsEveryDecisionAndVerifies) {
  const auto out = file("all.budledger");
  const auto summary = mergeProjects({{a_, b_}, out, kTech});
  EXPECT_EQ(summary.positions, 2);
  auto a = Project::open(a_, Database::Access::ReadOnly);
  auto b = Project::open(b_, Database::Access::ReadOnly);
  auto m = Project::open(out, Database::Access::ReadOnly);
  const auto report = verifyProject(m);
  ASSERT_TRUE(report.ok()) << report.problems.front();
  EXPECT_EQ(report.signOffsChecked, 1);

  auto expected = meanings(a);
  const auto more = meanings(b);
  expected.insert(expected.end(), more.begin(), more.end());
  std::sort(expected.begin(), expected.end());
  EXPECT_EQ(meanings(m), expected);

  const auto ja = readJournal(a.db());
  const auto jb = readJournal(b.db());
  const auto jm = readJournal(m.db());
  ASSERT_EQ(jm.size(), ja.size() + jb.size() + 1);
  for (std::size_t i = 0; i < ja.size(); ++i) {
    EXPECT_EQ(jm[i].origin, fmt::format("a.budledger#{}:{}", ja[i].seq, ja[i].hash));
    EXPECT_EQ(jm[i].utc, ja[i].utc);
    EXPECT_EQ(jm[i].actor, ja[i].actor);
  }
  EXPECT_EQ(jm[ja.size()].origin, fmt::format("b.budledger#1:{}", jb[0].hash));
  EXPECT_EQ(jm.back().action, JournalAction::Note);
  EXPECT_NE(jm.back().after.find("merged from a.budledger"), std::string::npos);

  // Lifespans per position are the sources' own, outcome override included.
  const auto west = *m.positionByName("west1");
  EXPECT_EQ(currentLifespansDigest(m, Scope::ofPosition(west.id)),
            currentLifespansDigest(a, Scope::ofPosition(a.positionByName("west1")->id)));
  EXPECT_EQ(m.meta(kMetaIntervalMin), "10");
  EXPECT_EQ(reviewItems(m.db()).size(), reviewItems(a.db()).size() + reviewItems(b.db()).size());

  // The merged project is editable like any other, and its history starts fresh.
  auto w = Project::open(out);
  Editor ed(w);
  EXPECT_FALSE(ed.nextUndo());
  EXPECT_THROW(ed.reject(kTech, currentEvents(w.db(), TrapRef{west.id, 0}).front().event.id),
               EditRefused);  // still signed off
}

TEST_F(MergeTest, RefusesTheSamePositionTwice) {
  const auto c = file("c.budledger");
  std::filesystem::copy_file(a_, c);
  try {
    mergeProjects({{a_, c}, file("out.budledger"), kTech});
    FAIL();
  } catch (const StoreError& e) {
    EXPECT_NE(std::string(e.what()).find("position 'west1' is in both"), std::string::npos)
        << e.what();
  }
  EXPECT_FALSE(std::filesystem::exists(file("out.budledger")));
}

TEST_F(MergeTest, RefusesTheSameNameWithDifferentInputs) {
  const auto c = file("c.budledger");
  {
    auto p = Project::create(c);
    p.setMeta(kMetaIntervalMin, "10");
    const auto fx =
        testing::makeFixture(p, {.positions = 1, .traps = 2, .seed = 5, .prefix = "west"});
    p.addInput({fx.positions[0], "/data/west1-copy.tif", 100, std::string(64, 'b')});
  }
  {
    // give a's west1 an input too
    Database raw(a_, Database::Access::ReadWrite);
    raw.exec(
        "INSERT INTO inputs(position_id, path, size_bytes, sha256) VALUES (1, '/data/west1.tif', "
        "100, '" +
        std::string(64, 'a') + "')");
  }
  try {
    mergeProjects({{a_, c}, file("out.budledger"), kTech});
    FAIL();
  } catch (const StoreError& e) {
    EXPECT_NE(std::string(e.what()).find("different input digests"), std::string::npos) << e.what();
  }
}

TEST_F(MergeTest, RefusesDifferentIntervalsAndExistingOutput) {
  {
    auto p = Project::open(b_);
    p.setMeta(kMetaIntervalMin, "5");
  }
  try {
    mergeProjects({{a_, b_}, file("out.budledger"), kTech});
    FAIL();
  } catch (const StoreError& e) {
    EXPECT_NE(std::string(e.what()).find("interval_min 10"), std::string::npos) << e.what();
  }
  EXPECT_THROW(mergeProjects({{a_, b_}, a_, kTech}), StoreError);
}

TEST_F(MergeTest, RefusesASourceThatDoesNotVerify) {
  {
    Database raw(b_, Database::Access::ReadWrite);
    raw.exec("DROP TRIGGER journal_no_update; UPDATE journal SET reason = 'x' WHERE seq = 2");
  }
  try {
    mergeProjects({{a_, b_}, file("out.budledger"), kTech});
    FAIL();
  } catch (const StoreError& e) {
    EXPECT_NE(std::string(e.what()).find("does not verify"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace budledger::store
