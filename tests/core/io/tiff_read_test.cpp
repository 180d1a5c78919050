// Reading stacks back pixel for pixel, in every layout libtiff writes.
#include <fmt/format.h>
#include <tiffio.h>

#include <cstdlib>

#include "core/io/frame_source.h"
#include "core/io/tiff_file.h"
#include "tests/core/io/io_test_support.h"

namespace budledger::io {
namespace {
using budledger::testing::TiffWriteOptions;
using budledger::testing::writeTiffStack;
using testsupport::identical;
using testsupport::sceneFrames;

class TiffRead : public testsupport::ScratchDir {};

void expectSame(const std::filesystem::path& path, const std::vector<cv::Mat>& frames) {
  auto src = openStack(path);
  ASSERT_EQ(src->info().frames, static_cast<int>(frames.size())) << path;
  for (int k = 0; k < src->info().frames; ++k)
    EXPECT_TRUE(identical(src->read(k), frames[static_cast<size_t>(k)])) << path << " frame " << k;
}

TEST_F(TiffRead, SixteenAndEightBitStacksReadBackExactly) {
  for (int bits : {16, 8}) {
    const auto frames = sceneFrames(5, bits);
    const auto path = file(fmt::format("s{}.tif", bits));
    writeTiffStack(path, frames);
    auto src = openStack(path);
    EXPECT_EQ(src->info().bitsPerSample, bits);
    EXPECT_EQ(src->info().cvType, bits == 8 ? CV_8UC1 : CV_16UC1);
    EXPECT_EQ(src->info().width, 200);
    EXPECT_EQ(src->info().height, 150);
    expectSame(path, frames);
  }
}

TEST_F(TiffRead, EveryCompressionStripAndTileLayoutWeWrite) {
  const auto frames = sceneFrames(4);
  struct Variant {
    const char* name;
    TiffWriteOptions options;
  };
  std::vector<Variant> variants{
      {"lzw", {COMPRESSION_LZW, false, 0, 0, ""}},
      {"deflate", {COMPRESSION_ADOBE_DEFLATE, false, 0, 0, ""}},
      {"packbits", {COMPRESSION_PACKBITS, false, 0, 0, ""}},
      {"strips", {COMPRESSION_NONE, false, 0, 7, ""}},
      {"tiles", {COMPRESSION_NONE, false, 64, 0, ""}},
      {"bigtiff-tiles-lzw", {COMPRESSION_LZW, true, 32, 0, ""}},
  };
  for (const auto& v : variants) {
    const auto path = file(fmt::format("{}.tif", v.name));
    writeTiffStack(path, frames, v.options);
    expectSame(path, frames);
  }
}

// The check against libtiff itself: its own tiffcp rewrites our stack in
// every variant the reader must support; each reads pixel-identical.
TEST_F(TiffRead, VariantsMadeByTiffcpArePixelIdentical) {
#ifndef BUDLEDGER_TIFFCP
  GTEST_SKIP() << "tiffcp (libtiff-tools) not found at configure time";
#else
  for (int bits : {16, 8}) {
    const auto frames = sceneFrames(4, bits, {203, 157});  // sizes that are no tile multiple
    const auto original = file(fmt::format("orig{}.tif", bits));
    writeTiffStack(original, frames);
    const std::vector<std::pair<std::string, std::string> > variants{
        {"lzw", "-c lzw"},
        {"zip", "-c zip"},
        {"packbits", "-c packbits"},
        {"bigtiff", "-8"},
        {"tiles", "-t"},
        {"lzw-pred", "-c lzw:2"},
        {"big-tiles-zip", "-8 -t -c zip"},
        {"strips-3", "-r 3"},
    };
    for (const auto& [name, args] : variants) {
      const auto out = file(fmt::format("{}{}.tif", name, bits));
      const std::string cmd =
          std::string(BUDLEDGER_TIFFCP) + " " + args + " " + original.string() + " " + out.string();
      ASSERT_EQ(std::system(cmd.c_str()), 0) << cmd;
      expectSame(out, frames);
      TiffFile t(out);
      if (args.find("-8") != std::string::npos) {
        EXPECT_TRUE(t.bigTiff()) << name;
      }
      if (args.find("-t") != std::string::npos) {
        EXPECT_TRUE(t.tiled()) << name;
      }
    }
  }
#endif
}

TEST_F(TiffRead, RandomAccessMatchesSequentialAndClonesAreIndependent) {
  const auto frames = sceneFrames(9);
  const auto path = file("r.tif");
  writeTiffStack(path, frames, {COMPRESSION_LZW, false, 0, 0, ""});
  auto src = openStack(path);
  for (int k : {8, 0, 5, 5, 3, 8, 1})
    EXPECT_TRUE(identical(src->read(k), frames[static_cast<size_t>(k)])) << k;
  auto other = src->clone();
  EXPECT_TRUE(identical(other->read(2), frames[2]));
  EXPECT_TRUE(identical(src->read(7), frames[7]));
  cv::Mat reused = src->read(0);
  const uchar* data = reused.data;
  src->read(4, reused);
  EXPECT_EQ(reused.data, data) << "a buffer of the right size is reused";
  EXPECT_TRUE(identical(reused, frames[4]));
}

TEST_F(TiffRead, MinIsWhitePagesAreInverted) {
  const auto frames = sceneFrames(2, 8);
  const auto path = file("white.tif");
  TIFF* tif = TIFFOpen(path.c_str(), "w");
  for (const auto& f : frames) {
    TIFFSetField(tif, TIFFTAG_IMAGEWIDTH, static_cast<uint32_t>(f.cols));
    TIFFSetField(tif, TIFFTAG_IMAGELENGTH, static_cast<uint32_t>(f.rows));
    TIFFSetField(tif, TIFFTAG_BITSPERSAMPLE, static_cast<uint16_t>(8));
    TIFFSetField(tif, TIFFTAG_SAMPLESPERPIXEL, static_cast<uint16_t>(1));
    TIFFSetField(tif, TIFFTAG_PHOTOMETRIC, PHOTOMETRIC_MINISWHITE);
    TIFFSetField(tif, TIFFTAG_ROWSPERSTRIP, static_cast<uint32_t>(f.rows));
    cv::Mat inverted = 255 - f;
    TIFFWriteEncodedStrip(tif, 0, inverted.data, static_cast<tmsize_t>(inverted.total()));
    TIFFWriteDirectory(tif);
  }
  TIFFClose(tif);
  expectSame(path, frames);
}

TEST(PositionName, DropsExtensionAndOmeSuffix) {
  EXPECT_EQ(positionNameFromFile("/data/pos03.ome.tif"), "pos03");
  EXPECT_EQ(positionNameFromFile("x.OME.TIFF"), "x");
  EXPECT_EQ(positionNameFromFile("a.b.tif"), "a.b");
  EXPECT_EQ(positionNameFromFile("plain.tiff"), "plain");
  EXPECT_EQ(positionNameFromFile(".ome.tif"), ".ome");
}

}  // namespace
}  // namespace budledger::io
