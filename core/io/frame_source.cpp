#include "core/io/frame_source.h"

#include <algorithm>
#include <cctype>

namespace budledger::io {

std::string positionNameFromFile(const std::filesystem::path& file) {
  std::string stem = file.stem().string();
  if (stem.size() > 4) {
    std::string tail = stem.substr(stem.size() - 4);
    std::transform(tail.begin(), tail.end(), tail.begin(),
                   [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
    if (tail == ".ome") stem.resize(stem.size() - 4);
  }
  return stem;
}

}  // namespace budledger::io
