#pragma once
// FrameSource: one position's time-lapse as a sequence of grayscale frames,
// whatever the files look like (a multi-page TIFF/BigTIFF stack, or a folder
// of single-frame TIFFs). It gives random access to frame k, for the
// engine's passes and the workstation's thumbnails alike, and holds at most a
// frame's worth of decoding state, never the movie. A source is used by one
// thread at a time; clone() gives an independent one for another thread.
#include <cstdint>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <opencv2/core.hpp>

#include "core/io/metadata.h"

namespace budledger::io {

struct InputFile {
  std::filesystem::path path;
  std::uint64_t sizeBytes = 0;
};

struct StackInfo {
  std::string positionName;  // from the file name (or the folder pattern)
  int width = 0;
  int height = 0;
  int frames = 0;
  int bitsPerSample = 0;  // 8 or 16; frames are CV_8UC1 or CV_16UC1
  int cvType = 0;
  std::vector<InputFile> files;  // the files the frames come from, in frame order
  StackMetadata metadata;
  int channel = 0;          // the channel these frames show
  std::string channelName;  // "" when the input names no channels
  std::string description;  // human summary, e.g. "BigTIFF, tiled, 240 frames"
};

struct OpenOptions {
  // Channel to read when the input has several: a name, or an index ("0").
  // Empty: the first channel.
  std::string channel;
  // Focal plane when the input has several (OME SizeZ > 1); default: middle.
  std::optional<int> z;
  // Fewer frames than this is refused (a time-lapse needs at least two).
  int minFrames = 2;
};

class FrameSource {
 public:
  virtual ~FrameSource() = default;
  virtual const StackInfo& info() const = 0;
  // Decodes frame `frame` (0-based) into `out`, reusing its buffer when it has
  // the right size and type. Throws InputError naming file and frame.
  virtual void read(int frame, cv::Mat& out) = 0;
  cv::Mat read(int frame) {
    cv::Mat m;
    read(frame, m);
    return m;
  }
  virtual std::unique_ptr<FrameSource> clone() const = 0;
};

// A multi-page TIFF or BigTIFF stack (OME-TIFF and ImageJ metadata honoured).
std::unique_ptr<FrameSource> openStack(const std::filesystem::path& file,
                                       const OpenOptions& options = {});

// The position name a stack file stands for: the file name without its
// extension and without a trailing ".ome" ("pos03.ome.tif" -> "pos03").
std::string positionNameFromFile(const std::filesystem::path& file);

}  // namespace budledger::io
