#pragma once
// OmeTiffWriter: streams a multi-page 16-bit grayscale TIFF, one page per
// time point, with OME-XML (open OME-TIFF convention, schema 2016-06) in the
// first page's ImageDescription: SizeT, TimeIncrement in minutes and
// PhysicalSizeX/Y in µm. Frames are written as they come, so memory does not
// grow with the movie. The file is written under a temporary name and renamed
// on close(), so a failed run never leaves a truncated stack behind.
#include <cstdint>
#include <filesystem>
#include <string>

namespace budledger::demo {

struct OmeTiffInfo {
  std::string imageName;
  int width = 0;
  int height = 0;
  int frames = 0;
  double intervalMin = 10.0;
  double pixelUm = 0.25;
  std::string compression = "none";  // none | deflate | lzw
};

std::string omeXml(const OmeTiffInfo& info);

class OmeTiffWriter {
 public:
  OmeTiffWriter(const std::filesystem::path& file, const OmeTiffInfo& info);
  ~OmeTiffWriter();
  OmeTiffWriter(const OmeTiffWriter&) = delete;
  OmeTiffWriter& operator=(const OmeTiffWriter&) = delete;

  void writeFrame(const std::uint16_t* pixels);  // width × height, row-major
  void close();                                  // after the last frame

 private:
  std::filesystem::path file_;
  std::filesystem::path partial_;
  OmeTiffInfo info_;
  std::string xml_;
  void* tif_ = nullptr;
  int written_ = 0;
};

}  // namespace budledger::demo
