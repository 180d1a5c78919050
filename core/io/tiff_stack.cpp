// The multi-page TIFF / BigTIFF stack source: maps frame t of the chosen
// channel and focal plane to a page of the file, following OME-XML or ImageJ
// metadata when present and "every page is a frame" otherwise.
#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <map>
#include <tuple>

#include "core/base/error.h"
#include "core/io/frame_source.h"
#include "core/io/tiff_file.h"

namespace budledger::io {
namespace {

class TiffStackSource final : public FrameSource {
 public:
  TiffStackSource(const std::filesystem::path& file, const OpenOptions& options)
      : options_(options), tiff_(std::make_unique<TiffFile>(file)) {
    const std::string name = file.string();
    auto& md = info_.metadata;
    md = parseImageDescription(tiff_->description());
    const int pages = tiff_->pageCount();
    if (!md.otherFile.empty() && md.otherFile != file.filename().string())
      throw InputError(name, std::nullopt,
                       fmt::format("OME-XML places planes in another file ('{}'); open a "
                                   "single-file OME-TIFF or each file on its own",
                                   md.otherFile));
    int sizeT = md.sizeT.value_or(0), sizeC = md.sizeC.value_or(1), sizeZ = md.sizeZ.value_or(1);
    sizeC = std::max(sizeC, 1);
    sizeZ = std::max(sizeZ, 1);
    if (md.kind == StackMetadata::Kind::None || sizeT <= 0) {
      // No usable dimensions: every page is a time point.
      sizeT = pages / (sizeC * sizeZ);
    }
    // Pages lost from the end of a file show only against what the writer
    // declared: the metadata's plane count or the pages' own numbering.
    const long planes = static_cast<long>(sizeT) * sizeC * sizeZ;
    if (md.explicitPlanes.empty() && planes > pages)
      throw InputError(
          name, pages,
          fmt::format("file is truncated: its metadata describes {} planes ({} time "
                      "points x {} channels x {} planes) but only {} pages are present",
                      planes, sizeT, sizeC, sizeZ, pages));
    if (tiff_->declaredPages() > pages)
      throw InputError(
          name, pages,
          fmt::format("file is truncated: its pages are numbered out of {} but only {} "
                      "are present",
                      tiff_->declaredPages(), pages));
    md.sizeT = sizeT;
    md.sizeC = sizeC;
    md.sizeZ = sizeZ;
    if (md.kind == StackMetadata::Kind::ImageJ && tiff_->xResolution() > 0) {
      // ImageJ keeps the pixel size as XResolution pixels per "unit".
      if (const auto um = toMicrometres(1.0 / tiff_->xResolution(), md.lengthUnit))
        md.pixelUmX = md.pixelUmY = um;
    }
    while (static_cast<int>(md.channels.size()) < sizeC)
      md.channels.push_back(fmt::format("channel {}", md.channels.size()));

    info_.channel = chooseChannel(name, md.channels, options.channel);
    info_.channelName = sizeC > 1 || md.kind == StackMetadata::Kind::OmeXml
                            ? md.channels[static_cast<size_t>(info_.channel)]
                            : std::string();
    const int z = std::clamp(options.z.value_or(sizeZ / 2), 0, sizeZ - 1);
    if (options.z && *options.z != z)
      throw InputError(
          name, std::nullopt,
          fmt::format("focal plane {} requested but the stack has {}", *options.z, sizeZ));
    const std::string order = md.dimensionOrder.size() == 5 ? md.dimensionOrder : "XYCZT";
    std::map<std::tuple<int, int, int>, int> explicitMap;
    for (const auto& p : md.explicitPlanes) explicitMap[{p.t, p.c, p.z}] = p.page;
    pageOfFrame_.resize(static_cast<size_t>(sizeT));
    for (int t = 0; t < sizeT; ++t) {
      int page = 0;
      if (!explicitMap.empty()) {
        const auto it = explicitMap.find({t, info_.channel, z});
        if (it == explicitMap.end())
          throw InputError(
              name, t,
              fmt::format("OME-XML lists no page for time point {}, channel {}", t, info_.channel));
        page = it->second;
      } else {
        page = pageFor(order, t, info_.channel, z, sizeT, sizeC, sizeZ);
      }
      if (page < 0 || page >= pages)
        throw InputError(
            name, t,
            fmt::format("file is truncated: frame {} would be page {} of {}", t, page, pages));
      pageOfFrame_[static_cast<size_t>(t)] = page;
    }

    info_.positionName = positionNameFromFile(file);
    info_.width = tiff_->width();
    info_.height = tiff_->height();
    info_.frames = sizeT;
    info_.bitsPerSample = tiff_->bitsPerSample();
    info_.cvType = tiff_->cvType();
    info_.files = {InputFile{file, tiff_->fileSize()}};
    info_.description = fmt::format(
        "{}, {}, {} frames of {}x{} {}-bit{}{}", tiff_->bigTiff() ? "BigTIFF" : "TIFF",
        tiff_->tiled() ? "tiled" : "striped", sizeT, info_.width, info_.height, info_.bitsPerSample,
        md.kind == StackMetadata::Kind::OmeXml   ? ", OME-XML"
        : md.kind == StackMetadata::Kind::ImageJ ? ", ImageJ"
                                                 : "",
        sizeC > 1 ? fmt::format(", channel '{}' of {}", info_.channelName, sizeC) : "");
    if (info_.frames < options.minFrames)
      throw InputError(name, std::nullopt,
                       fmt::format("stack has {} frame{}; a time-lapse needs at least {}",
                                   info_.frames, info_.frames == 1 ? "" : "s", options.minFrames));
  }

  const StackInfo& info() const override { return info_; }

  void read(int frame, cv::Mat& out) override {
    if (frame < 0 || frame >= info_.frames)
      throw InputError(info_.files.front().path.string(), frame,
                       fmt::format("frame out of range (stack has {})", info_.frames));
    tiff_->readPage(pageOfFrame_[static_cast<size_t>(frame)], out, frame);
  }

  std::unique_ptr<FrameSource> clone() const override {
    return std::make_unique<TiffStackSource>(info_.files.front().path, options_);
  }

 private:
  static int chooseChannel(const std::string& file, const std::vector<std::string>& channels,
                           const std::string& wanted) {
    if (wanted.empty()) return 0;
    for (size_t i = 0; i < channels.size(); ++i)
      if (channels[i] == wanted) return static_cast<int>(i);
    int index = -1;
    const auto [p, ec] = std::from_chars(wanted.data(), wanted.data() + wanted.size(), index);
    if (ec == std::errc() && p == wanted.data() + wanted.size() && index >= 0 &&
        index < static_cast<int>(channels.size()))
      return index;
    std::string names;
    for (const auto& c : channels) names += (names.empty() ? "" : ", ") + c;
    throw InputError(file, std::nullopt,
                     fmt::format("no channel '{}' (channels: {})", wanted, names));
  }

  OpenOptions options_;
  std::unique_ptr<TiffFile> tiff_;
  StackInfo info_;
  std::vector<int> pageOfFrame_;
};

}  // namespace

std::unique_ptr<FrameSource> openStack(const std::filesystem::path& file,
                                       const OpenOptions& options) {
  return std::make_unique<TiffStackSource>(file, options);
}

}  // namespace budledger::io
