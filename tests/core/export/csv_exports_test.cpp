#include "core/export/csv_exports.h"

#include <gtest/gtest.h>

#include <sstream>

#include "core/store/editor.h"
#include "core/store/materialised.h"
#include "tests/core/store/fixture.h"

namespace budledger::exporting {
namespace {

using store::testing::kTech;

class CsvExportTest : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = store::testing::scratchDir("csv_exports");
    project_ =
        std::make_unique<store::Project>(store::Project::create((dir_ / "p.budledger").string()));
    pos_ = project_->addPosition({0, "north, left", "strain A", 50, 100, 100});
    project_->replaceTraps(pos_, {{pos_, 0, 0, 0, 10, 10, false}, {pos_, 1, 0, 1, 30, 10, false}});
    project_->setMeta(store::kMetaIntervalMin, "10");
    auto ev = [&](int trap, int frame, EventKind k, double c) {
      return Event{0, pos_, trap, frame, k, c};
    };
    project_->addEngineRun({0, "", "e", "{}", ""},
                           {ev(0, 3, EventKind::Bud, 0.9), ev(0, 8, EventKind::Separation, 0.75),
                            ev(0, 20, EventKind::Washout, 0.5), ev(0, 30, EventKind::Arrival, 0.5),
                            ev(1, 5, EventKind::Separation, 0.25)});
  }
  void TearDown() override {
    project_.reset();
    std::filesystem::remove_all(dir_);
  }
  std::string events() {
    std::ostringstream s;
    writeEventsCsv(*project_, s);
    return s.str();
  }
  std::string lifespans() {
    std::ostringstream s;
    writeLifespansCsv(*project_, s);
    return s.str();
  }
  std::filesystem::path dir_;
  std::unique_ptr<store::Project> project_;
  int pos_ = 0;
};

TEST_F(CsvExportTest, EventsAndLifespansFromProposals) {
  // Expected rows worked out by hand from the lineage rules (core/lineage/lineage.h):
  // trap 0 — mother 0 from frame 0, one division, washed out at 20 (last frame 19);
  // mother 1 arrives at 30 and stays to the end (frame 49). Trap 1 — one division.
  EXPECT_EQ(events(),
            "position,group,trap_id,mother_id,frame,time_min,kind,confidence,status\n"
            "\"north, left\",strain A,0,0,3,30,bud,0.9,proposed\n"
            "\"north, left\",strain A,0,0,8,80,separation,0.75,proposed\n"
            "\"north, left\",strain A,0,0,20,200,washout,0.5,proposed\n"
            "\"north, left\",strain A,0,1,30,300,arrival,0.5,proposed\n"
            "\"north, left\",strain A,1,0,5,50,separation,0.25,proposed\n");
  EXPECT_EQ(lifespans(),
            "position,group,trap_id,mother_id,first_frame,last_frame,divisions,outcome,"
            "censor_reason\n"
            "\"north, left\",strain A,0,0,0,19,1,censored,washout\n"
            "\"north, left\",strain A,0,1,30,49,0,censored,end-of-imaging\n"
            "\"north, left\",strain A,1,0,0,49,1,censored,end-of-imaging\n");
}

TEST_F(CsvExportTest, DecisionsShowInBothFiles) {
  store::Editor ed(*project_);
  const auto evs = store::currentEvents(project_->db(), store::TrapRef{pos_, 1});
  ed.reject(kTech, evs[0].event.id, "not a separation");
  const auto added = ed.add(kTech, {pos_, 1}, 40, EventKind::Death, "stopped budding");
  ed.accept(kTech, store::currentEvents(project_->db(), store::TrapRef{pos_, 0})[0].event.id);
  const auto e = events();
  EXPECT_NE(e.find("\"north, left\",strain A,0,0,3,30,bud,0.9,accepted\n"), std::string::npos);
  EXPECT_NE(e.find("\"north, left\",strain A,1,,5,50,separation,0.25,rejected\n"),
            std::string::npos);
  EXPECT_NE(e.find("\"north, left\",strain A,1,0,40,400,death,1,added\n"), std::string::npos);
  EXPECT_NE(lifespans().find("\"north, left\",strain A,1,0,0,40,0,death,\n"), std::string::npos);
  EXPECT_TRUE(added.recorded());
}

}  // namespace
}  // namespace budledger::exporting
