// The background reader: order, errors, early stop.
#include <tiffio.h>
#include <fstream>

#include "core/base/error.h"
#include "core/io/frame_source.h"
#include "core/io/frame_stream.h"
#include "tests/core/io/io_test_support.h"

namespace budledger::io {
namespace {
using budledger::testing::writeTiffStack;
using testsupport::identical;
using testsupport::sceneFrames;

class Stream : public testsupport::ScratchDir {};

TEST_F(Stream, DeliversEveryFrameInOrder) {
  const auto frames = sceneFrames(11);
  writeTiffStack(file("s.tif"), frames, {COMPRESSION_LZW, false, 0, 0, ""});
  auto src = openStack(file("s.tif"));
  for (int depth : {1, 3}) {
    FrameStream stream(*src, {depth, 2, 9});
    int index = -1, expected = 2;
    while (const cv::Mat* f = stream.next(&index)) {
      EXPECT_EQ(index, expected);
      EXPECT_TRUE(identical(*f, frames[static_cast<size_t>(index)]));
      ++expected;
    }
    EXPECT_EQ(expected, 9);
    EXPECT_EQ(stream.next(), nullptr);
  }
}

TEST_F(Stream, ADecodeErrorReachesTheConsumerAfterTheGoodFrames) {
  const auto frames = sceneFrames(5);
  const auto path = file("bad.tif");
  writeTiffStack(path, frames, {COMPRESSION_ADOBE_DEFLATE, false, 0, 0, ""});
  uint64_t offset = 0, count = 0;
  {
    TIFF* tif = TIFFOpen(path.c_str(), "r");
    TIFFSetDirectory(tif, 3);
    offset = TIFFGetStrileOffset(tif, 0);
    count = TIFFGetStrileByteCount(tif, 0);
    TIFFClose(tif);
  }
  {
    std::fstream f(path, std::ios::in | std::ios::out | std::ios::binary);
    f.seekp(static_cast<std::streamoff>(offset));  // from the zlib header on
    const std::string junk(static_cast<size_t>(count / 2), '\x33');
    f.write(junk.data(), static_cast<std::streamsize>(junk.size()));
  }
  auto src = openStack(path);
  FrameStream stream(*src);
  int seen = 0;
  try {
    while (stream.next()) ++seen;
    FAIL() << "expected the corrupt frame to be reported";
  } catch (const InputError& e) {
    EXPECT_EQ(e.frame(), 3);
  }
  EXPECT_EQ(seen, 3);
}

TEST_F(Stream, StoppingEarlyDoesNotHang) {
  writeTiffStack(file("s.tif"), sceneFrames(20));
  auto src = openStack(file("s.tif"));
  for (int i = 0; i < 5; ++i) {
    FrameStream stream(*src, {2, 0, -1});
    ASSERT_NE(stream.next(), nullptr);
  }  // destroyed while the reader waits for a free slot
}

}  // namespace
}  // namespace budledger::io
