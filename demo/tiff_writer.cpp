#include "demo/tiff_writer.h"

#include <fmt/format.h>
#include <tiffio.h>

#include <algorithm>
#include <cstdarg>
#include <system_error>
#include <vector>

#include "budledger/version.h"
#include "core/base/error.h"

namespace budledger::demo {
namespace {

// Keeps libtiff from printing to stderr; failures surface through return codes.
void quietHandler(const char*, const char*, va_list) {}

}  // namespace

std::string omeXml(const OmeTiffInfo& i) {
  std::string planes;
  for (int t = 0; t < i.frames; ++t)
    planes += fmt::format(
        "      <Plane TheZ=\"0\" TheC=\"0\" TheT=\"{}\" DeltaT=\"{}\" DeltaTUnit=\"min\"/>\n", t,
        t * i.intervalMin);
  return fmt::format(
      "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
      "<OME xmlns=\"http://www.openmicroscopy.org/Schemas/OME/2016-06\" "
      "xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\" "
      "xsi:schemaLocation=\"http://www.openmicroscopy.org/Schemas/OME/2016-06 "
      "http://www.openmicroscopy.org/Schemas/OME/2016-06/ome.xsd\" "
      "Creator=\"BudLedger simulator {}\">\n"
      "  <Image ID=\"Image:0\" Name=\"{}\">\n"
      "    <Pixels ID=\"Pixels:0\" DimensionOrder=\"XYCZT\" Type=\"uint16\" "
      "SignificantBits=\"16\" BigEndian=\"false\" Interleaved=\"false\" "
      "SizeX=\"{}\" SizeY=\"{}\" SizeZ=\"1\" SizeC=\"1\" SizeT=\"{}\" "
      "PhysicalSizeX=\"{}\" PhysicalSizeXUnit=\"µm\" PhysicalSizeY=\"{}\" "
      "PhysicalSizeYUnit=\"µm\" TimeIncrement=\"{}\" TimeIncrementUnit=\"min\">\n"
      "      <Channel ID=\"Channel:0:0\" Name=\"Brightfield\" SamplesPerPixel=\"1\" "
      "IlluminationType=\"Transmitted\" ContrastMethod=\"Brightfield\"><LightPath/></Channel>\n"
      "      <TiffData IFD=\"0\" PlaneCount=\"{}\"/>\n"
      "{}"
      "    </Pixels>\n"
      "  </Image>\n"
      "</OME>\n",
      kVersion, i.imageName, i.width, i.height, i.frames, i.pixelUm, i.pixelUm, i.intervalMin,
      i.frames, planes);
}

OmeTiffWriter::OmeTiffWriter(const std::filesystem::path& file, const OmeTiffInfo& info)
    : file_(file), partial_(file.string() + ".part"), info_(info), xml_(omeXml(info)) {
  TIFFSetWarningHandler(quietHandler);
  TIFFSetErrorHandler(quietHandler);
  const double bytes = 2.0 * info.width * info.height * static_cast<double>(info.frames);
  // Little-endian on every host (byte-identical files); BigTIFF beyond what classic TIFF holds.
  const char* mode = bytes > 3.5e9 ? "w8l" : "wl";
  tif_ = TIFFOpen(partial_.string().c_str(), mode);
  if (!tif_) throw InputError(partial_.string(), std::nullopt, "cannot be created");
}

OmeTiffWriter::~OmeTiffWriter() {
  if (tif_) {
    TIFFClose(static_cast<TIFF*>(tif_));
    std::error_code ec;
    std::filesystem::remove(partial_, ec);
  }
}

void OmeTiffWriter::writeFrame(const std::uint16_t* pixels) {
  auto* tif = static_cast<TIFF*>(tif_);
  const auto w = static_cast<std::uint32_t>(info_.width),
             h = static_cast<std::uint32_t>(info_.height);
  TIFFSetField(tif, TIFFTAG_IMAGEWIDTH, w);
  TIFFSetField(tif, TIFFTAG_IMAGELENGTH, h);
  TIFFSetField(tif, TIFFTAG_BITSPERSAMPLE, 16);
  TIFFSetField(tif, TIFFTAG_SAMPLESPERPIXEL, 1);
  TIFFSetField(tif, TIFFTAG_SAMPLEFORMAT, SAMPLEFORMAT_UINT);
  TIFFSetField(tif, TIFFTAG_PHOTOMETRIC, PHOTOMETRIC_MINISBLACK);
  TIFFSetField(tif, TIFFTAG_PLANARCONFIG, PLANARCONFIG_CONTIG);
  TIFFSetField(tif, TIFFTAG_SUBFILETYPE, FILETYPE_PAGE);
  TIFFSetField(tif, TIFFTAG_PAGENUMBER, static_cast<std::uint16_t>(written_),
               static_cast<std::uint16_t>(info_.frames));
  std::uint16_t compression = COMPRESSION_NONE;
  if (info_.compression == "deflate") compression = COMPRESSION_ADOBE_DEFLATE;
  if (info_.compression == "lzw") compression = COMPRESSION_LZW;
  TIFFSetField(tif, TIFFTAG_COMPRESSION, compression);
  if (compression != COMPRESSION_NONE) TIFFSetField(tif, TIFFTAG_PREDICTOR, PREDICTOR_HORIZONTAL);
  if (compression == COMPRESSION_ADOBE_DEFLATE) TIFFSetField(tif, TIFFTAG_ZIPQUALITY, 1);
  const std::uint32_t rowsPerStrip = std::max<std::uint32_t>(1, 65536 / (2 * w));
  TIFFSetField(tif, TIFFTAG_ROWSPERSTRIP, rowsPerStrip);
  TIFFSetField(tif, TIFFTAG_RESOLUTIONUNIT, RESUNIT_CENTIMETER);
  TIFFSetField(tif, TIFFTAG_XRESOLUTION, static_cast<float>(1e4 / info_.pixelUm));
  TIFFSetField(tif, TIFFTAG_YRESOLUTION, static_cast<float>(1e4 / info_.pixelUm));
  TIFFSetField(tif, TIFFTAG_SOFTWARE, "BudLedger simulator");
  if (written_ == 0) TIFFSetField(tif, TIFFTAG_IMAGEDESCRIPTION, xml_.c_str());

  for (std::uint32_t row = 0, strip = 0; row < h; row += rowsPerStrip, ++strip) {
    const std::uint32_t rows = std::min(rowsPerStrip, h - row);
    // libtiff may modify the buffer when it applies the predictor; give it a copy.
    const tmsize_t size = static_cast<tmsize_t>(rows) * w * 2;
    std::vector<std::uint16_t> buf(pixels + static_cast<std::size_t>(row) * w,
                                   pixels + static_cast<std::size_t>(row + rows) * w);
    if (TIFFWriteEncodedStrip(tif, strip, buf.data(), size) < 0)
      throw InputError(partial_.string(), written_, "writing a strip failed (disk full?)");
  }
  if (!TIFFWriteDirectory(tif))
    throw InputError(partial_.string(), written_, "writing the page directory failed");
  ++written_;
}

void OmeTiffWriter::close() {
  if (!tif_) return;
  if (written_ != info_.frames)
    throw InputError(partial_.string(), written_,
                     fmt::format("only {} of {} frames were written", written_, info_.frames));
  TIFFClose(static_cast<TIFF*>(tif_));
  tif_ = nullptr;
  std::error_code ec;
  std::filesystem::rename(partial_, file_, ec);
  if (ec)
    throw InputError(file_.string(), std::nullopt, "cannot be renamed into place: " + ec.message());
}

}  // namespace budledger::demo
