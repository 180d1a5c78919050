// OME-XML (the open OME-TIFF convention) and ImageJ descriptions.
#include <tiffio.h>

#include "core/base/error.h"
#include "core/io/frame_source.h"
#include "core/io/metadata.h"
#include "tests/core/io/io_test_support.h"

namespace budledger::io {
namespace {
using budledger::testing::omeXml;
using budledger::testing::TiffWriteOptions;
using budledger::testing::writeTiffStack;
using testsupport::identical;
using testsupport::sceneFrames;

TEST(OmeXml, ReadsDimensionsIntervalPixelSizeAndChannels) {
  const auto md = parseImageDescription(omeXml(512, 256, 240, 16, 10.0, 0.25, {"BF", "GFP"}));
  EXPECT_EQ(md.kind, StackMetadata::Kind::OmeXml);
  EXPECT_EQ(md.sizeT, 240);
  EXPECT_EQ(md.sizeC, 2);
  EXPECT_EQ(md.sizeZ, 1);
  EXPECT_EQ(md.dimensionOrder, "XYCZT");
  ASSERT_TRUE(md.intervalMin);
  EXPECT_DOUBLE_EQ(*md.intervalMin, 10.0);
  ASSERT_TRUE(md.pixelUmX);
  EXPECT_DOUBLE_EQ(*md.pixelUmX, 0.25);
  EXPECT_EQ(md.channels, (std::vector<std::string>{"BF", "GFP"}));
}

// Units as OME's UnitsTime/UnitsLength name them; TimeIncrement defaults to
// seconds and PhysicalSize to micrometres in the OME schema.
TEST(OmeXml, ConvertsUnitsAndAppliesSchemaDefaults) {
  const std::string xml =
      R"(<?xml version="1.0"?><ome:OME xmlns:ome="http://www.openmicroscopy.org/Schemas/OME/2016-06">)"
      R"(<ome:Image ID="Image:0"><ome:Pixels DimensionOrder="XYZCT" SizeT="3" SizeC="1" SizeZ="1" )"
      R"(TimeIncrement="600" PhysicalSizeX="320" PhysicalSizeXUnit="nm" PhysicalSizeY="0.32">)"
      R"(<ome:Channel Name="bright &amp; field"/></ome:Pixels></ome:Image></ome:OME>)";
  const auto md = parseImageDescription(xml);
  EXPECT_DOUBLE_EQ(md.intervalMin.value_or(0), 10.0);  // 600 s
  EXPECT_DOUBLE_EQ(md.pixelUmX.value_or(0), 0.32);     // 320 nm
  EXPECT_DOUBLE_EQ(md.pixelUmY.value_or(0), 0.32);     // default unit µm
  EXPECT_EQ(md.channels, std::vector<std::string>{"bright & field"});
  EXPECT_EQ(toMinutes(2, "h"), 120.0);
  EXPECT_EQ(toMinutes(30000, "ms"), 0.5);
  EXPECT_EQ(toMicrometres(1, "mm"), 1000.0);
  EXPECT_FALSE(toMinutes(1, "fortnight"));
}

TEST(OmeXml, IntervalFromPlaneDeltaTWhenNoTimeIncrement) {
  const std::string xml =
      R"(<OME><Image><Pixels SizeT="3" SizeC="1" SizeZ="1" DimensionOrder="XYCZT">)"
      R"(<Plane TheT="0" TheC="0" TheZ="0" DeltaT="0" DeltaTUnit="s"/>)"
      R"(<Plane TheT="1" TheC="0" TheZ="0" DeltaT="300.5" DeltaTUnit="s"/>)"
      R"(<Plane TheT="2" TheC="0" TheZ="0" DeltaT="601" DeltaTUnit="s"/></Pixels></Image></OME>)";
  const auto md = parseImageDescription(xml);
  ASSERT_TRUE(md.intervalMin);
  EXPECT_NEAR(*md.intervalMin, 300.5 / 60, 1e-9);
}

TEST(ImageDescription, ImageJHyperstackAndPlainText) {
  const auto ij = parseImageDescription(
      "ImageJ=1.53t\nimages=20\nchannels=2\nframes=10\n"
      "finterval=300\nunit=micron\n");
  EXPECT_EQ(ij.kind, StackMetadata::Kind::ImageJ);
  EXPECT_EQ(ij.sizeT, 10);
  EXPECT_EQ(ij.sizeC, 2);
  EXPECT_DOUBLE_EQ(ij.intervalMin.value_or(0), 5.0);
  EXPECT_EQ(ij.lengthUnit, "micron");
  EXPECT_EQ(parseImageDescription("made by a camera").kind, StackMetadata::Kind::None);
  EXPECT_EQ(parseImageDescription("<broken xml").kind, StackMetadata::Kind::None);
}

TEST(PageOrder, FollowsDimensionOrder) {
  // XYCZT: channel fastest, then z, then time.
  EXPECT_EQ(pageFor("XYCZT", 2, 1, 0, 5, 3, 1), 2 * 3 + 1);
  // XYTCZ: time fastest.
  EXPECT_EQ(pageFor("XYTCZ", 2, 1, 0, 5, 3, 1), 2 + 5 * 1);
}

class StackMetadataTest : public testsupport::ScratchDir {};

TEST_F(StackMetadataTest, OmeStackReportsIntervalAndPixelSize) {
  const auto frames = sceneFrames(4);
  const auto path = file("pos.ome.tif");
  TiffWriteOptions w;
  w.description = omeXml(200, 150, 4, 16, 7.5, 0.31);
  writeTiffStack(path, frames, w);
  auto src = openStack(path);
  EXPECT_EQ(src->info().positionName, "pos");
  EXPECT_DOUBLE_EQ(src->info().metadata.intervalMin.value_or(0), 7.5);
  EXPECT_DOUBLE_EQ(src->info().metadata.pixelUmX.value_or(0), 0.31);
  EXPECT_EQ(src->info().channelName, "BF");
}

TEST_F(StackMetadataTest, ChoosesTheChannelOfAMultiChannelStack) {
  // Pages in XYCZT order: t0c0, t0c1, t1c0, t1c1, ...
  const auto bf = sceneFrames(3);
  std::vector<cv::Mat> pages;
  std::vector<cv::Mat> fluo;
  for (const auto& f : bf) {
    fluo.push_back(cv::Mat(f.size(), f.type(), cv::Scalar(100 + 10 * fluo.size())));
    pages.push_back(f);
    pages.push_back(fluo.back());
  }
  const auto path = file("two.ome.tif");
  TiffWriteOptions w;
  w.description = omeXml(200, 150, 3, 16, 10, 0.25, {"BF", "GFP"});
  writeTiffStack(path, pages, w);
  auto first = openStack(path);
  EXPECT_EQ(first->info().frames, 3);
  EXPECT_EQ(first->info().channelName, "BF");
  for (int t = 0; t < 3; ++t) EXPECT_TRUE(identical(first->read(t), bf[static_cast<size_t>(t)]));
  OpenOptions byName;
  byName.channel = "GFP";
  auto gfp = openStack(path, byName);
  for (int t = 0; t < 3; ++t) EXPECT_TRUE(identical(gfp->read(t), fluo[static_cast<size_t>(t)]));
  OpenOptions byIndex;
  byIndex.channel = "1";
  EXPECT_TRUE(identical(openStack(path, byIndex)->read(2), fluo[2]));
  OpenOptions wrong;
  wrong.channel = "RFP";
  try {
    openStack(path, wrong);
    FAIL() << "expected an InputError";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("no channel 'RFP' (channels: BF, GFP)"), std::string::npos)
        << e.what();
  }
}

TEST_F(StackMetadataTest, MorePlanesInTheMetadataThanPagesMeansTruncated) {
  const auto frames = sceneFrames(5);
  const auto path = file("claims.ome.tif");
  TiffWriteOptions w;
  w.description = omeXml(200, 150, 9, 16, 10, 0.25);  // 9 time points, 5 pages
  writeTiffStack(path, frames, w);
  try {
    openStack(path);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.frame(), 5);
    EXPECT_NE(std::string(e.what()).find("truncated"), std::string::npos) << e.what();
  }
}

TEST_F(StackMetadataTest, FewerPlanesThanPagesReadsTheFirstImage) {
  const auto frames = sceneFrames(5);
  const auto path = file("series.ome.tif");
  TiffWriteOptions w;
  w.description = omeXml(200, 150, 3, 16, 10, 0.25);  // e.g. the first of several series
  writeTiffStack(path, frames, w);
  auto src = openStack(path);
  EXPECT_EQ(src->info().frames, 3);
  EXPECT_TRUE(identical(src->read(2), frames[2]));
}

}  // namespace
}  // namespace budledger::io
