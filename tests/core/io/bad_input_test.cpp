// Bad input: one clear InputError naming file and frame, never a crash.
#include <tiffio.h>

#include <fstream>

#include "core/base/error.h"
#include "core/io/frame_source.h"
#include "tests/core/io/io_test_support.h"

namespace budledger::io {
namespace {
using budledger::testing::TiffWriteOptions;
using budledger::testing::writeTiffStack;
using testsupport::sceneFrames;

class BadInput : public testsupport::ScratchDir {
 protected:
  // The InputError that opening (and reading every frame of) `path` throws.
  InputError failure(const std::filesystem::path& path) {
    try {
      auto src = openStack(path);
      for (int k = 0; k < src->info().frames; ++k) src->read(k);
    } catch (const InputError& e) {
      return e;
    }
    ADD_FAILURE() << "no InputError for " << path;
    return InputError("none");
  }
  void expectMessage(const std::filesystem::path& path, const std::string& part,
                     std::optional<long> frame) {
    const InputError e = failure(path);
    EXPECT_EQ(e.file(), path.string());
    EXPECT_EQ(e.frame(), frame) << e.what();
    EXPECT_NE(std::string(e.what()).find(part), std::string::npos) << e.what();
    EXPECT_EQ(std::string(e.what()).find('\n'), std::string::npos) << "one line: " << e.what();
  }
  static void writeRaw(const std::filesystem::path& path, int spp, int bits, int format,
                       int photometric) {
    TIFF* tif = TIFFOpen(path.c_str(), "w");
    const int w = 16, h = 8;
    TIFFSetField(tif, TIFFTAG_IMAGEWIDTH, static_cast<uint32_t>(w));
    TIFFSetField(tif, TIFFTAG_IMAGELENGTH, static_cast<uint32_t>(h));
    TIFFSetField(tif, TIFFTAG_BITSPERSAMPLE, static_cast<uint16_t>(bits));
    TIFFSetField(tif, TIFFTAG_SAMPLESPERPIXEL, static_cast<uint16_t>(spp));
    TIFFSetField(tif, TIFFTAG_SAMPLEFORMAT, static_cast<uint16_t>(format));
    TIFFSetField(tif, TIFFTAG_PHOTOMETRIC, static_cast<uint16_t>(photometric));
    TIFFSetField(tif, TIFFTAG_PLANARCONFIG, PLANARCONFIG_CONTIG);
    TIFFSetField(tif, TIFFTAG_ROWSPERSTRIP, static_cast<uint32_t>(h));
    std::vector<unsigned char> data(static_cast<size_t>(w * h * spp * bits / 8), 1);
    for (int page = 0; page < 2; ++page) {
      TIFFWriteEncodedStrip(tif, 0, data.data(), static_cast<tmsize_t>(data.size()));
      TIFFWriteDirectory(tif);
    }
    TIFFClose(tif);
  }
};

TEST_F(BadInput, MissingFile) { expectMessage(file("absent.tif"), "file not found", std::nullopt); }

TEST_F(BadInput, NotATiff) {
  std::ofstream(file("notes.tif")) << "these are notes about the experiment, not an image\n";
  expectMessage(file("notes.tif"), "not a TIFF file", std::nullopt);
  std::ofstream(file("empty.tif"));
  expectMessage(file("empty.tif"), "not a TIFF file", std::nullopt);
}

TEST_F(BadInput, TruncatedStackNamesTheFirstIncompleteFrame) {
  const auto frames = sceneFrames(6);
  const auto path = file("cut.tif");
  writeTiffStack(path, frames);
  // libtiff writes each page's pixels, then its directory: cutting the file
  // in the middle leaves the pages before intact.
  const auto size = std::filesystem::file_size(path);
  std::filesystem::resize_file(path, size / 2);
  const InputError e = failure(path);
  EXPECT_EQ(e.file(), path.string());
  ASSERT_TRUE(e.frame().has_value()) << e.what();
  EXPECT_GE(*e.frame(), 2);
  EXPECT_LE(*e.frame(), 3);
  EXPECT_NE(std::string(e.what()).find("truncated"), std::string::npos) << e.what();
}

TEST_F(BadInput, CorruptCompressedDataIsReportedAtItsFrame) {
  const auto frames = sceneFrames(4);
  const auto path = file("corrupt.tif");
  writeTiffStack(path, frames, {COMPRESSION_ADOBE_DEFLATE, false, 0, 0, ""});
  // Overwrite frame 2's compressed strip from its zlib header on. (Damage
  // further in can go unnoticed: libtiff stops decoding once it has the
  // pixels and never reaches the stream's checksum.)
  uint64_t offset = 0, count = 0;
  {
    TIFF* tif = TIFFOpen(path.c_str(), "r");
    TIFFSetDirectory(tif, 2);
    offset = TIFFGetStrileOffset(tif, 0);
    count = TIFFGetStrileByteCount(tif, 0);
    TIFFClose(tif);
  }
  {
    std::fstream f(path, std::ios::in | std::ios::out | std::ios::binary);
    f.seekp(static_cast<std::streamoff>(offset));
    const std::string junk(static_cast<size_t>(count / 2), '\x5a');
    f.write(junk.data(), static_cast<std::streamsize>(junk.size()));
  }
  expectMessage(path, "corrupt pixel data", 2);
}

TEST_F(BadInput, MixedFrameSizes) {
  auto frames = sceneFrames(3);
  frames[2] = cv::Mat(100, 120, CV_16U, cv::Scalar(5));
  const auto path = file("mixed.tif");
  writeTiffStack(path, frames);
  expectMessage(path, "mixed frame sizes: this page is 120x100 16-bit but page 0 is 200x150 16-bit",
                2);
}

TEST_F(BadInput, RgbFloatSignedAndOddDepthsAreRefused) {
  writeRaw(file("rgb.tif"), 3, 8, SAMPLEFORMAT_UINT, PHOTOMETRIC_RGB);
  expectMessage(file("rgb.tif"), "unsupported sample format: 3 samples per pixel", 0);
  writeRaw(file("float.tif"), 1, 32, SAMPLEFORMAT_IEEEFP, PHOTOMETRIC_MINISBLACK);
  expectMessage(file("float.tif"), "unsupported sample format: 32-bit floating point", 0);
  writeRaw(file("signed.tif"), 1, 16, SAMPLEFORMAT_INT, PHOTOMETRIC_MINISBLACK);
  expectMessage(file("signed.tif"), "signed", 0);
  writeRaw(file("deep.tif"), 1, 32, SAMPLEFORMAT_UINT, PHOTOMETRIC_MINISBLACK);
  expectMessage(file("deep.tif"), "32 bits per sample", 0);
}

TEST_F(BadInput, OneFrameStackIsNotATimeLapse) {
  const auto path = file("single.tif");
  writeTiffStack(path, sceneFrames(1));
  expectMessage(path, "stack has 1 frame; a time-lapse needs at least 2", std::nullopt);
  OpenOptions lenient;
  lenient.minFrames = 1;  // e.g. a single image for a thumbnail
  EXPECT_EQ(openStack(path, lenient)->info().frames, 1);
}

TEST_F(BadInput, FrameOutOfRange) {
  const auto path = file("ok.tif");
  writeTiffStack(path, sceneFrames(2));
  auto src = openStack(path);
  EXPECT_THROW(src->read(2), InputError);
  EXPECT_THROW(src->read(-1), InputError);
}

TEST_F(BadInput, AFolderIsNotAStack) { expectMessage(dir_, "is a folder", std::nullopt); }

}  // namespace
}  // namespace budledger::io
