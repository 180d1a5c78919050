#pragma once
// TiffFile: one TIFF or BigTIFF file opened with libtiff, every page checked
// on open to be single-sample 8- or 16-bit unsigned grayscale of one size with
// its pixel data inside the file, and any page decodable on demand (striped or
// tiled; any compression this libtiff has a codec for: none, LZW, Deflate,
// PackBits, ...). libtiff's messages are captured per handle, never printed,
// and turned into InputError naming the file and page. Not thread-safe: open
// one TiffFile per thread.
#include <cstdint>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

namespace budledger::io {

class TiffFile {
 public:
  // Throws InputError for a missing, unreadable, non-TIFF, truncated or
  // unsupported file, naming the file and the first offending page.
  explicit TiffFile(const std::filesystem::path& path);
  ~TiffFile();
  TiffFile(const TiffFile&) = delete;
  TiffFile& operator=(const TiffFile&) = delete;

  const std::filesystem::path& path() const { return path_; }
  int pageCount() const { return static_cast<int>(pages_.size()); }
  int width() const { return width_; }
  int height() const { return height_; }
  int bitsPerSample() const { return bits_; }  // 8 or 16
  int cvType() const { return bits_ == 8 ? CV_8UC1 : CV_16UC1; }
  bool bigTiff() const { return bigTiff_; }
  bool tiled() const { return tiled_; }
  std::uint64_t fileSize() const { return fileSize_; }
  // ImageDescription of the first page ("" if none): where OME-XML lives.
  const std::string& description() const { return description_; }
  // XResolution of the first page in pixels per unit (0 if absent).
  double xResolution() const { return xResolution_; }
  // The page count the PageNumber tag of the first page declares (0 if absent).
  int declaredPages() const { return declaredPages_; }

  // Decodes page `page` into `out` (reallocated only if its size or type
  // differs). `frameForErrors` is the frame number an error should name.
  void readPage(int page, cv::Mat& out, long frameForErrors);

 private:
  struct Page {
    std::uint64_t offset;  // IFD offset, for O(1) random access
    bool minIsWhite;
  };
  void selectPage(int page, long frameForErrors);
  [[noreturn]] void fail(std::optional<long> frame, const std::string& what);
  std::string takeMessage();

  std::filesystem::path path_;
  struct Handle;
  std::unique_ptr<Handle> h_;
  std::vector<Page> pages_;
  int current_ = -1;
  int width_ = 0, height_ = 0, bits_ = 0;
  bool bigTiff_ = false, tiled_ = false;
  std::uint64_t fileSize_ = 0;
  std::string description_;
  double xResolution_ = 0;
  int declaredPages_ = 0;
  std::vector<unsigned char> tileBuffer_;
};

}  // namespace budledger::io
