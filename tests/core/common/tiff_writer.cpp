#include "tests/core/common/tiff_writer.h"

#include <fmt/format.h>
#include <tiffio.h>

#include <stdexcept>

namespace budledger::testing {

void writeTiffStack(const std::filesystem::path& path, const std::vector<cv::Mat>& frames,
                    const TiffWriteOptions& o) {
  TIFF* tif = TIFFOpen(path.c_str(), o.bigTiff ? "w8" : "w");
  if (!tif) throw std::runtime_error("cannot write " + path.string());
  for (size_t k = 0; k < frames.size(); ++k) {
    const cv::Mat& f = frames[k];
    const int bits = f.depth() == CV_8U ? 8 : 16;
    TIFFSetField(tif, TIFFTAG_IMAGEWIDTH, static_cast<uint32_t>(f.cols));
    TIFFSetField(tif, TIFFTAG_IMAGELENGTH, static_cast<uint32_t>(f.rows));
    TIFFSetField(tif, TIFFTAG_BITSPERSAMPLE, static_cast<uint16_t>(bits));
    TIFFSetField(tif, TIFFTAG_SAMPLESPERPIXEL, static_cast<uint16_t>(1));
    TIFFSetField(tif, TIFFTAG_PHOTOMETRIC, PHOTOMETRIC_MINISBLACK);
    TIFFSetField(tif, TIFFTAG_PLANARCONFIG, PLANARCONFIG_CONTIG);
    TIFFSetField(tif, TIFFTAG_COMPRESSION, o.compression);
    if (k == 0 && !o.description.empty())
      TIFFSetField(tif, TIFFTAG_IMAGEDESCRIPTION, o.description.c_str());
    if (frames.size() > 1) {
      TIFFSetField(tif, TIFFTAG_SUBFILETYPE, FILETYPE_PAGE);
      TIFFSetField(tif, TIFFTAG_PAGENUMBER, static_cast<uint16_t>(k),
                   static_cast<uint16_t>(frames.size()));
    }
    const size_t rowBytes = static_cast<size_t>(f.cols) * static_cast<size_t>(bits / 8);
    if (o.tileSize > 0) {
      TIFFSetField(tif, TIFFTAG_TILEWIDTH, static_cast<uint32_t>(o.tileSize));
      TIFFSetField(tif, TIFFTAG_TILELENGTH, static_cast<uint32_t>(o.tileSize));
      std::vector<unsigned char> tile(static_cast<size_t>(TIFFTileSize(tif)));
      for (int y = 0; y < f.rows; y += o.tileSize)
        for (int x = 0; x < f.cols; x += o.tileSize) {
          std::fill(tile.begin(), tile.end(), 0);
          const size_t tileRow = static_cast<size_t>(o.tileSize) * static_cast<size_t>(bits / 8);
          for (int r = 0; r < o.tileSize && y + r < f.rows; ++r) {
            const int cols = std::min(o.tileSize, f.cols - x);
            std::memcpy(tile.data() + static_cast<size_t>(r) * tileRow,
                        f.ptr<unsigned char>(y + r) + static_cast<size_t>(x) * (bits / 8),
                        static_cast<size_t>(cols) * static_cast<size_t>(bits / 8));
          }
          if (TIFFWriteTile(tif, tile.data(), static_cast<uint32_t>(x), static_cast<uint32_t>(y), 0,
                            0) < 0)
            throw std::runtime_error("cannot write tile");
        }
    } else {
      const int rps = o.rowsPerStrip > 0 ? o.rowsPerStrip : f.rows;
      TIFFSetField(tif, TIFFTAG_ROWSPERSTRIP, static_cast<uint32_t>(rps));
      for (int y = 0, s = 0; y < f.rows; y += rps, ++s) {
        const int rows = std::min(rps, f.rows - y);
        cv::Mat part = f.rowRange(y, y + rows).clone();
        if (TIFFWriteEncodedStrip(tif, static_cast<uint32_t>(s), part.data,
                                  static_cast<tmsize_t>(rowBytes * static_cast<size_t>(rows))) < 0)
          throw std::runtime_error("cannot write strip");
      }
    }
    if (!TIFFWriteDirectory(tif)) throw std::runtime_error("cannot write directory");
  }
  TIFFClose(tif);
}

std::string omeXml(int width, int height, int frames, int bits, double intervalMin, double pixelUm,
                   const std::vector<std::string>& channels) {
  std::string ch;
  for (size_t i = 0; i < channels.size(); ++i)
    ch += fmt::format(R"(<Channel ID="Channel:0:{}" Name="{}" SamplesPerPixel="1"/>)", i,
                      channels[i]);
  return fmt::format(
      R"(<?xml version="1.0" encoding="UTF-8"?>)"
      R"(<OME xmlns="http://www.openmicroscopy.org/Schemas/OME/2016-06">)"
      R"(<Image ID="Image:0" Name="test"><Pixels ID="Pixels:0" DimensionOrder="XYCZT" )"
      R"(Type="uint{}" SizeX="{}" SizeY="{}" SizeZ="1" SizeC="{}" SizeT="{}" )"
      R"(PhysicalSizeX="{}" PhysicalSizeXUnit="µm" PhysicalSizeY="{}" PhysicalSizeYUnit="µm" )"
      R"(TimeIncrement="{}" TimeIncrementUnit="min">{}<TiffData/></Pixels></Image></OME>)",
      bits, width, height, channels.size(), frames, pixelUm, pixelUm, intervalMin, ch);
}

}  // namespace budledger::testing
