#include "core/io/tiff_file.h"

#include <fmt/format.h>
#include <tiffio.h>

#include <cstdarg>
#include <cstdio>
#include <cstring>
#include <system_error>

#include "core/base/error.h"

namespace budledger::io {

struct TiffFile::Handle {
  TIFF* tif = nullptr;
  std::string lastError;  // libtiff's most recent error message for this handle
  ~Handle() {
    if (tif) TIFFClose(tif);
  }
};

namespace {

int captureError(TIFF*, void* user, const char* module, const char* fmt, va_list ap) {
  auto* handle = static_cast<std::string*>(user);
  char buf[512];
  std::vsnprintf(buf, sizeof buf, fmt, ap);
  *handle = module && *module ? fmt::format("{}: {}", module, buf) : std::string(buf);
  return 1;  // handled: libtiff must not print it
}

int ignoreWarning(TIFF*, void*, const char*, const char*, va_list) {
  // Unknown private tags (microscope vendors, ImageJ) are common and harmless.
  return 1;
}

std::string describeCompression(uint16_t c) {
  const TIFFCodec* codec = TIFFFindCODEC(c);
  return codec && codec->name ? fmt::format("{} ({})", codec->name, c) : std::to_string(c);
}

}  // namespace

std::string TiffFile::takeMessage() {
  std::string m = std::move(h_->lastError);
  h_->lastError.clear();
  return m.empty() ? std::string("unreadable data") : m;
}

void TiffFile::fail(std::optional<long> frame, const std::string& what) {
  throw InputError(path_.string(), frame, what);
}

TiffFile::TiffFile(const std::filesystem::path& path)
    : path_(path), h_(std::make_unique<Handle>()) {
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) fail(std::nullopt, "file not found");
  if (std::filesystem::is_directory(path, ec)) fail(std::nullopt, "is a folder, not a TIFF file");
  fileSize_ = std::filesystem::file_size(path, ec);
  if (ec) fail(std::nullopt, fmt::format("cannot read file ({})", ec.message()));
  if (fileSize_ < 8) fail(std::nullopt, "not a TIFF file (too short)");
  {
    // Tell "not a TIFF" from "a damaged TIFF" by the magic bytes.
    std::FILE* f = std::fopen(path.c_str(), "rb");
    if (!f) fail(std::nullopt, fmt::format("cannot open file ({})", std::strerror(errno)));
    unsigned char magic[4] = {};
    const size_t n = std::fread(magic, 1, 4, f);
    std::fclose(f);
    const bool order =
        n == 4 && ((magic[0] == 'I' && magic[1] == 'I') || (magic[0] == 'M' && magic[1] == 'M'));
    const int version = magic[0] == 'I' ? magic[2] | (magic[3] << 8) : (magic[2] << 8) | magic[3];
    if (!order || (version != 42 && version != 43))
      fail(std::nullopt, "not a TIFF file (no TIFF signature)");
  }

  TIFFOpenOptions* opts = TIFFOpenOptionsAlloc();
  TIFFOpenOptionsSetErrorHandlerExtR(opts, captureError, &h_->lastError);
  TIFFOpenOptionsSetWarningHandlerExtR(opts, ignoreWarning, nullptr);
  // "m": no memory mapping. Mapped pages of a large stack would count as this
  // process's memory and grow with every frame read; plain reads keep the
  // footprint at a frame or two whatever the length of the movie.
  h_->tif = TIFFOpenExt(path.c_str(), "rm", opts);
  TIFFOpenOptionsFree(opts);
  if (!h_->tif) fail(std::nullopt, fmt::format("not a readable TIFF file ({})", takeMessage()));
  TIFF* tif = h_->tif;
  bigTiff_ = TIFFIsBigTIFF(tif) != 0;

  // Walk every directory once: validate it and remember its offset.
  for (long page = 0;; ++page) {
    uint32_t w = 0, hgt = 0;
    uint16_t bits = 1, spp = 1, format = SAMPLEFORMAT_UINT, photometric = PHOTOMETRIC_MINISBLACK;
    uint16_t compression = COMPRESSION_NONE;
    TIFFGetField(tif, TIFFTAG_IMAGEWIDTH, &w);
    TIFFGetField(tif, TIFFTAG_IMAGELENGTH, &hgt);
    TIFFGetFieldDefaulted(tif, TIFFTAG_BITSPERSAMPLE, &bits);
    TIFFGetFieldDefaulted(tif, TIFFTAG_SAMPLESPERPIXEL, &spp);
    TIFFGetFieldDefaulted(tif, TIFFTAG_SAMPLEFORMAT, &format);
    TIFFGetFieldDefaulted(tif, TIFFTAG_COMPRESSION, &compression);
    if (!TIFFGetField(tif, TIFFTAG_PHOTOMETRIC, &photometric)) photometric = PHOTOMETRIC_MINISBLACK;
    if (w == 0 || hgt == 0) fail(page, "page has no image size");
    if (spp != 1 || photometric == PHOTOMETRIC_RGB || photometric == PHOTOMETRIC_PALETTE ||
        photometric == PHOTOMETRIC_YCBCR || photometric == PHOTOMETRIC_SEPARATED)
      fail(page, fmt::format("unsupported sample format: {} samples per pixel (photometric {}); "
                             "only single-channel grayscale is supported",
                             spp, photometric));
    if (format == SAMPLEFORMAT_IEEEFP)
      fail(page, fmt::format("unsupported sample format: {}-bit floating point; only 8- or "
                             "16-bit unsigned grayscale is supported",
                             bits));
    if (format != SAMPLEFORMAT_UINT)
      fail(page, fmt::format("unsupported sample format: {}-bit signed or complex integers; only "
                             "8- or 16-bit unsigned grayscale is supported",
                             bits));
    if (bits != 8 && bits != 16)
      fail(page, fmt::format("unsupported sample format: {} bits per sample; only 8- or 16-bit "
                             "grayscale is supported",
                             bits));
    if (photometric != PHOTOMETRIC_MINISBLACK && photometric != PHOTOMETRIC_MINISWHITE)
      fail(page, fmt::format("unsupported photometric interpretation {}", photometric));
    if (!TIFFIsCODECConfigured(compression))
      fail(page, fmt::format("compression {} is not supported by this libtiff",
                             describeCompression(compression)));
    if (page == 0) {
      width_ = static_cast<int>(w);
      height_ = static_cast<int>(hgt);
      bits_ = bits;
      tiled_ = TIFFIsTiled(tif) != 0;
      char* desc = nullptr;
      if (TIFFGetField(tif, TIFFTAG_IMAGEDESCRIPTION, &desc) && desc) description_ = desc;
      float xres = 0;
      if (TIFFGetField(tif, TIFFTAG_XRESOLUTION, &xres)) xResolution_ = xres;
      uint16_t pageNo = 0, pageTotal = 0;
      if (TIFFGetField(tif, TIFFTAG_PAGENUMBER, &pageNo, &pageTotal)) declaredPages_ = pageTotal;
    } else if (static_cast<int>(w) != width_ || static_cast<int>(hgt) != height_ || bits != bits_) {
      fail(page, fmt::format("mixed frame sizes: this page is {}x{} {}-bit but page 0 is "
                             "{}x{} {}-bit",
                             w, hgt, bits, width_, height_, bits_));
    }
    // A truncated file shows as pixel data that would end past the file's end.
    const uint32_t pieces = TIFFIsTiled(tif) ? TIFFNumberOfTiles(tif) : TIFFNumberOfStrips(tif);
    for (uint32_t i = 0; i < pieces; ++i) {
      const uint64_t off = TIFFGetStrileOffset(tif, i);
      const uint64_t count = TIFFGetStrileByteCount(tif, i);
      if (off + count > fileSize_ || (count > 0 && off == 0))
        fail(page, fmt::format("file is truncated or corrupt: pixel data at bytes {}..{} lies "
                               "beyond the end of the {}-byte file",
                               off, off + count, fileSize_));
    }
    pages_.push_back({TIFFCurrentDirOffset(tif), photometric == PHOTOMETRIC_MINISWHITE});
    h_->lastError.clear();
    if (!TIFFReadDirectory(tif)) {
      // Either the chain ended, or the next directory is damaged.
      if (!h_->lastError.empty())
        fail(page + 1, fmt::format("file is truncated or corrupt: {}", takeMessage()));
      break;
    }
  }
  current_ = pageCount() - 1;
}

TiffFile::~TiffFile() = default;

void TiffFile::selectPage(int page, long frame) {
  if (page < 0 || page >= pageCount())
    fail(frame, fmt::format("page {} out of range (file has {})", page, pageCount()));
  if (page == current_) return;
  if (!TIFFSetSubDirectory(h_->tif, pages_[static_cast<size_t>(page)].offset)) {
    current_ = -1;
    fail(frame, fmt::format("cannot read page {}: {}", page, takeMessage()));
  }
  current_ = page;
}

void TiffFile::readPage(int page, cv::Mat& out, long frame) {
  selectPage(page, frame);
  TIFF* tif = h_->tif;
  out.create(height_, width_, cvType());
  const size_t rowBytes = static_cast<size_t>(width_) * static_cast<size_t>(bits_ / 8);
  auto* dst = out.ptr<unsigned char>();  // Mat::create gives a continuous buffer
  auto decodeError = [&] {
    current_ = -1;  // libtiff's state after a decode error is not to be trusted
    fail(frame, fmt::format("corrupt pixel data: {}", takeMessage()));
  };
  if (TIFFIsTiled(tif)) {
    uint32_t tw = 0, th = 0;
    TIFFGetField(tif, TIFFTAG_TILEWIDTH, &tw);
    TIFFGetField(tif, TIFFTAG_TILELENGTH, &th);
    if (tw == 0 || th == 0) fail(frame, "tiled page without tile size");
    const size_t tileBytes = static_cast<size_t>(TIFFTileSize64(tif));
    tileBuffer_.resize(tileBytes);
    const size_t tileRow = static_cast<size_t>(tw) * static_cast<size_t>(bits_ / 8);
    for (uint32_t y = 0; y < static_cast<uint32_t>(height_); y += th) {
      for (uint32_t x = 0; x < static_cast<uint32_t>(width_); x += tw) {
        const uint32_t tile = TIFFComputeTile(tif, x, y, 0, 0);
        if (TIFFReadEncodedTile(tif, tile, tileBuffer_.data(), static_cast<tmsize_t>(tileBytes)) <
            0)
          decodeError();
        const uint32_t rows = std::min<uint32_t>(th, static_cast<uint32_t>(height_) - y);
        const size_t cols = std::min<size_t>(tw, static_cast<size_t>(width_) - x);
        const size_t bytes = cols * static_cast<size_t>(bits_ / 8);
        for (uint32_t r = 0; r < rows; ++r)
          std::memcpy(dst + (y + r) * rowBytes + x * static_cast<size_t>(bits_ / 8),
                      tileBuffer_.data() + r * tileRow, bytes);
      }
    }
  } else {
    uint32_t rowsPerStrip = 0;
    TIFFGetFieldDefaulted(tif, TIFFTAG_ROWSPERSTRIP, &rowsPerStrip);
    rowsPerStrip = std::min<uint32_t>(rowsPerStrip == 0 ? height_ : rowsPerStrip,
                                      static_cast<uint32_t>(height_));
    const uint32_t strips = TIFFNumberOfStrips(tif);
    for (uint32_t s = 0; s < strips; ++s) {
      const uint32_t row0 = s * rowsPerStrip;
      if (row0 >= static_cast<uint32_t>(height_)) break;
      const uint32_t rows = std::min(rowsPerStrip, static_cast<uint32_t>(height_) - row0);
      if (TIFFReadEncodedStrip(tif, s, dst + row0 * rowBytes,
                               static_cast<tmsize_t>(rows * rowBytes)) < 0)
        decodeError();
    }
  }
  if (pages_[static_cast<size_t>(page)].minIsWhite) cv::bitwise_not(out, out);
}

}  // namespace budledger::io
