#include "core/evaluate/truth.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "core/base/error.h"

namespace budledger::evaluate {
namespace {

namespace fs = std::filesystem;

class TruthFolder : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() /
           ("budledger-truth-" + std::to_string(::testing::UnitTest::GetInstance()->random_seed()) +
            "-" + ::testing::UnitTest::GetInstance()->current_test_info()->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_ / "truth" / "A01");
    write("positions.csv",
          "position,group,file,frames,interval_min,pixel_um\nA01,wild type,A01.ome.tif,120,10,"
          "0.27\n");
    write("truth/A01/traps.csv", "trap_id,row,col,x,y\n0,0,0,101.5,80\n1,0,1,241.5,80\n");
    write("truth/A01/events.csv",
          "trap_id,mother_id,frame,kind\n0,0,12,bud\n0,0,19,separation\n1,0,40,death\n");
    write("truth/A01/lifespans.csv",
          "trap_id,mother_id,first_frame,last_frame,divisions,outcome\n0,0,0,119,1,censored\n1,"
          "0,0,40,0,death\n");
    write("truth/A01/drift.csv", "frame,dx,dy\n0,0,0\n");
  }
  void TearDown() override { fs::remove_all(dir_); }
  void write(const std::string& rel, const std::string& text) { std::ofstream(dir_ / rel) << text; }
  fs::path dir_;
};

TEST_F(TruthFolder, ReadsEveryFile) {
  const Truth t = readTruth(dir_.string());
  ASSERT_EQ(t.positions.size(), 1u);
  const TruthPosition& p = t.positions[0];
  EXPECT_EQ(p.name, "A01");
  EXPECT_EQ(p.group, "wild type");
  EXPECT_EQ(p.frames, 120);
  EXPECT_DOUBLE_EQ(p.pixelUm, 0.27);
  ASSERT_EQ(p.traps.size(), 2u);
  EXPECT_DOUBLE_EQ(p.traps[1].x, 241.5);
  ASSERT_EQ(p.events.size(), 3u);
  EXPECT_EQ(p.events[1].kind, EventKind::Separation);
  ASSERT_EQ(p.tenures.size(), 2u);
  EXPECT_TRUE(p.tenures[1].died);
  EXPECT_FALSE(p.tenures[0].died);
}

TEST_F(TruthFolder, BadKindNamesFileAndRow) {
  write("truth/A01/events.csv", "trap_id,mother_id,frame,kind\n0,0,12,bud\n0,0,19,split\n");
  try {
    readTruth(dir_.string());
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    const std::string what = e.what();
    EXPECT_NE(what.find("events.csv"), std::string::npos) << what;
    EXPECT_NE(what.find("row 3"), std::string::npos) << what;
    EXPECT_NE(what.find("split"), std::string::npos) << what;
  }
}

TEST_F(TruthFolder, MissingColumnIsReported) {
  write("truth/A01/traps.csv", "trap_id,row,col,x\n0,0,0,1\n");
  EXPECT_THROW(readTruth(dir_.string()), InputError);
}

}  // namespace
}  // namespace budledger::evaluate
