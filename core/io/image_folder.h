#pragma once
// A folder of single-frame TIFFs whose file names say which position, time
// point and channel each holds, described by a pattern such as
// "{position}_t{time}_c{channel}.tif". Placeholders: {position} (text),
// {time} (an integer; frames are ordered by it and must be consecutive),
// {channel} (text), {z} (an integer focal plane); '*' matches any text; all
// other characters match themselves. Without a pattern every .tif/.tiff file
// of the folder is one frame of one position named after the folder, in the
// order of the last number in each name.
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "core/io/frame_source.h"

namespace budledger::io {

struct FolderPosition {
  std::string name;
  std::filesystem::path folder;
  std::vector<std::string> channels;          // sorted; empty if the pattern has none
  std::vector<std::filesystem::path> frames;  // of the chosen channel, in time order
  std::vector<int> times;                     // the {time} value of each frame
};

// Lists the positions of a folder. Throws InputError for a missing or empty
// folder, a pattern that matches nothing, duplicate or missing time points.
std::vector<FolderPosition> scanFolder(const std::filesystem::path& folder,
                                       const std::string& pattern = {},
                                       const OpenOptions& options = {});

// Opens one position of a folder; every file is checked to be a one-page
// TIFF of the same size and bit depth as the first (InputError otherwise).
std::unique_ptr<FrameSource> openFolderPosition(const FolderPosition& position,
                                                const OpenOptions& options = {});

}  // namespace budledger::io
