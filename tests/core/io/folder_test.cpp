// Folders of single-frame TIFFs named by a position/time/channel pattern.
#include <fmt/format.h>
#include "core/base/error.h"
#include "core/io/image_folder.h"
#include "tests/core/io/io_test_support.h"

namespace budledger::io {
namespace {
using budledger::testing::writeTiffStack;
using testsupport::identical;
using testsupport::sceneFrames;

class Folder : public testsupport::ScratchDir {
 protected:
  void write(const std::string& name, const cv::Mat& frame) { writeTiffStack(file(name), {frame}); }
};

TEST_F(Folder, PatternGivesPositionsTimesAndChannels) {
  const auto frames = sceneFrames(4);
  for (int t = 0; t < 4; ++t)
    for (const char* pos : {"A1", "B2"}) {
      write(fmt::format("{}_t{}_BF.tif", pos, t + 1), frames[static_cast<size_t>(t)]);
      write(fmt::format("{}_t{}_GFP.tif", pos, t + 1),
            cv::Mat(frames[0].size(), CV_16U, cv::Scalar(7)));
    }
  write("notes_t1_x.txt.tif.bak", frames[0]);  // not a .tif: ignored
  OpenOptions bf;
  bf.channel = "BF";
  const auto positions = scanFolder(dir_, "{position}_t{time}_{channel}.tif", bf);
  ASSERT_EQ(positions.size(), 2u);
  EXPECT_EQ(positions[0].name, "A1");
  EXPECT_EQ(positions[1].name, "B2");
  EXPECT_EQ(positions[0].channels, (std::vector<std::string>{"BF", "GFP"}));
  EXPECT_EQ(positions[0].times, (std::vector<int>{1, 2, 3, 4}));
  auto src = openFolderPosition(positions[1], bf);
  EXPECT_EQ(src->info().frames, 4);
  EXPECT_EQ(src->info().positionName, "B2");
  EXPECT_EQ(src->info().files.size(), 4u);
  for (int t = 3; t >= 0; --t) EXPECT_TRUE(identical(src->read(t), frames[static_cast<size_t>(t)]));
}

TEST_F(Folder, WithoutPatternOrdersByTheLastNumber) {
  const auto frames = sceneFrames(12);
  for (int t = 0; t < 12; ++t) write(fmt::format("img{}.tif", t), frames[static_cast<size_t>(t)]);
  const auto positions = scanFolder(dir_);
  ASSERT_EQ(positions.size(), 1u);
  EXPECT_EQ(positions[0].name, dir_.filename().string());
  auto src = openFolderPosition(positions[0]);
  for (int t = 0; t < 12; ++t)  // img10 after img9, not after img1
    EXPECT_TRUE(identical(src->read(t), frames[static_cast<size_t>(t)])) << t;
}

TEST_F(Folder, MissingTimePointOrDuplicateIsAnError) {
  const auto frames = sceneFrames(3);
  write("p_t0.tif", frames[0]);
  write("p_t1.tif", frames[1]);
  write("p_t3.tif", frames[2]);
  try {
    scanFolder(dir_, "{position}_t{time}.tif");
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("time point 2 is missing (next file is p_t3.tif)"),
              std::string::npos)
        << e.what();
  }
  write("p_t2.tif", frames[2]);
  write("p_t002.tif", frames[2]);
  EXPECT_THROW(scanFolder(dir_, "{position}_t{time}.tif"), InputError);
}

TEST_F(Folder, EmptyMissingAndUnmatchedFoldersAreErrors) {
  EXPECT_THROW(scanFolder(dir_), InputError);
  EXPECT_THROW(scanFolder(dir_ / "nope"), InputError);
  write("frame1.tif", sceneFrames(1)[0]);
  EXPECT_THROW(scanFolder(dir_, "{position}_t{time}.tif"), InputError);
  EXPECT_THROW(scanFolder(dir_, "{position}_{when}.tif"), InputError);  // unknown placeholder
  EXPECT_THROW(scanFolder(dir_, "{position}.tif"), InputError);         // no {time}
}

TEST_F(Folder, MixedSizesNameTheFileAndFrame) {
  const auto frames = sceneFrames(2);
  write("f0.tif", frames[0]);
  write("f1.tif", frames[1]);
  write("f2.tif", cv::Mat(64, 64, CV_16U, cv::Scalar(1)));
  const auto positions = scanFolder(dir_);
  try {
    openFolderPosition(positions[0]);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.file(), file("f2.tif").string());
    EXPECT_EQ(e.frame(), 2);
    EXPECT_NE(std::string(e.what()).find("mixed frame sizes"), std::string::npos) << e.what();
  }
}

TEST_F(Folder, OneFrameIsNotATimeLapse) {
  write("only1.tif", sceneFrames(1)[0]);
  const auto positions = scanFolder(dir_);
  EXPECT_THROW(openFolderPosition(positions[0]), InputError);
}

}  // namespace
}  // namespace budledger::io
