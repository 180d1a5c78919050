#pragma once
// Writes test stacks with libtiff: multi-page, 8/16-bit, striped or tiled,
// any compression, classic or BigTIFF, with an optional ImageDescription on
// the first page (for OME-XML).
#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

namespace budledger::testing {

struct TiffWriteOptions {
  std::uint16_t compression = 1;  // COMPRESSION_NONE
  bool bigTiff = false;
  int tileSize = 0;         // 0: strips
  int rowsPerStrip = 0;     // 0: one strip per page
  std::string description;  // first page only
};

void writeTiffStack(const std::filesystem::path& path, const std::vector<cv::Mat>& frames,
                    const TiffWriteOptions& options = {});

// A minimal single-image OME-XML header for a stack of `frames` frames.
std::string omeXml(int width, int height, int frames, int bits, double intervalMin, double pixelUm,
                   const std::vector<std::string>& channels = {"BF"});

}  // namespace budledger::testing
