#include "core/io/image_folder.h"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <charconv>
#include <map>
#include <optional>
#include <regex>
#include <set>
#include <system_error>

#include "core/base/error.h"
#include "core/io/tiff_file.h"

namespace budledger::io {
namespace {

struct Compiled {
  std::regex regex;
  int position = 0, time = 0, channel = 0, z = 0;  // capture group numbers, 0 = absent
};

Compiled compilePattern(const std::filesystem::path& folder, const std::string& pattern) {
  Compiled c;
  std::string re;
  int group = 0;
  for (size_t i = 0; i < pattern.size(); ++i) {
    const char ch = pattern[i];
    if (ch == '{') {
      const size_t end = pattern.find('}', i);
      if (end == std::string::npos)
        throw InputError(folder.string(), std::nullopt,
                         fmt::format("file name pattern '{}' has an unclosed '{{'", pattern));
      const std::string key = pattern.substr(i + 1, end - i - 1);
      ++group;
      if (key == "position" || key == "p") {
        c.position = group;
        re += "(.+?)";
      } else if (key == "channel" || key == "c") {
        c.channel = group;
        re += "(.+?)";
      } else if (key == "time" || key == "t") {
        c.time = group;
        re += "([0-9]+)";
      } else if (key == "z") {
        c.z = group;
        re += "([0-9]+)";
      } else {
        throw InputError(folder.string(), std::nullopt,
                         fmt::format("file name pattern '{}': unknown placeholder {{{}}} (use "
                                     "{{position}}, {{time}}, {{channel}}, {{z}})",
                                     pattern, key));
      }
      i = end;
    } else if (ch == '*') {
      re += ".*?";
    } else if (std::isalnum(static_cast<unsigned char>(ch)) || ch == '_' || ch == '-' ||
               ch == ' ') {
      re += ch;
    } else {
      re += '\\';
      re += ch;
    }
  }
  if (!c.time)
    throw InputError(folder.string(), std::nullopt,
                     fmt::format("file name pattern '{}' has no {{time}}", pattern));
  c.regex = std::regex(re, std::regex::ECMAScript | std::regex::icase);
  return c;
}

bool isTiffName(const std::filesystem::path& p) {
  std::string ext = p.extension().string();
  std::transform(ext.begin(), ext.end(), ext.begin(),
                 [](unsigned char ch) { return static_cast<char>(std::tolower(ch)); });
  return ext == ".tif" || ext == ".tiff";
}

std::optional<long> lastNumber(const std::string& name) {
  const std::string stem = std::filesystem::path(name).stem().string();
  size_t end = stem.find_last_of("0123456789");
  if (end == std::string::npos) return std::nullopt;
  size_t begin = end;
  while (begin > 0 && std::isdigit(static_cast<unsigned char>(stem[begin - 1]))) --begin;
  long v = 0;
  std::from_chars(stem.data() + begin, stem.data() + end + 1, v);
  return v;
}

long toInt(const std::string& s) {
  long v = 0;
  std::from_chars(s.data(), s.data() + s.size(), v);
  return v;
}

struct Entry {
  std::filesystem::path path;
  std::string channel;
  long z = 0;
  long time = 0;
};

}  // namespace

std::vector<FolderPosition> scanFolder(const std::filesystem::path& folder,
                                       const std::string& pattern, const OpenOptions& options) {
  const std::string where = folder.string();
  std::error_code ec;
  if (!std::filesystem::exists(folder, ec))
    throw InputError(where, std::nullopt, "folder not found");
  if (!std::filesystem::is_directory(folder, ec))
    throw InputError(where, std::nullopt, "not a folder");
  std::vector<std::filesystem::path> names;
  for (const auto& e : std::filesystem::directory_iterator(folder, ec))
    if (e.is_regular_file() && isTiffName(e.path())) names.push_back(e.path());
  if (ec)
    throw InputError(where, std::nullopt, fmt::format("cannot list folder ({})", ec.message()));
  if (names.empty())
    throw InputError(where, std::nullopt, "folder holds no TIFF files (.tif, .tiff)");
  std::sort(names.begin(), names.end());

  std::map<std::string, std::vector<Entry>> byPosition;
  auto absolute = std::filesystem::absolute(folder).lexically_normal();
  if (absolute.filename().empty()) absolute = absolute.parent_path();  // "dir/" names "dir"
  const std::string folderName = absolute.filename().string();
  if (pattern.empty()) {
    // Order by the last number in each name when those are distinct.
    std::vector<std::optional<long>> keys;
    std::set<long> distinct;
    for (const auto& n : names) {
      keys.push_back(lastNumber(n.filename().string()));
      if (keys.back()) distinct.insert(*keys.back());
    }
    std::vector<size_t> order(names.size());
    for (size_t i = 0; i < order.size(); ++i) order[i] = i;
    if (distinct.size() == names.size())
      std::sort(order.begin(), order.end(),
                [&](size_t a, size_t b) { return *keys[a] < *keys[b]; });
    auto& list = byPosition[folderName];
    for (size_t k = 0; k < order.size(); ++k)
      list.push_back({names[order[k]], "", 0, static_cast<long>(k)});
  } else {
    const Compiled c = compilePattern(folder, pattern);
    for (const auto& n : names) {
      std::smatch m;
      const std::string file = n.filename().string();
      if (!std::regex_match(file, m, c.regex)) continue;
      Entry e{n, c.channel ? m[c.channel].str() : "", c.z ? toInt(m[c.z].str()) : 0,
              toInt(m[c.time].str())};
      byPosition[c.position ? m[c.position].str() : folderName].push_back(std::move(e));
    }
    if (byPosition.empty())
      throw InputError(where, std::nullopt,
                       fmt::format("no file name matches the pattern '{}'", pattern));
  }

  std::vector<FolderPosition> out;
  for (auto& [name, entries] : byPosition) {
    FolderPosition pos;
    pos.name = name;
    pos.folder = folder;
    std::set<std::string> channels;
    std::set<long> zs;
    for (const auto& e : entries) {
      channels.insert(e.channel);
      zs.insert(e.z);
    }
    if (!(channels.size() == 1 && channels.begin()->empty()))
      pos.channels.assign(channels.begin(), channels.end());
    std::string channel = pos.channels.empty() ? std::string() : pos.channels.front();
    if (!options.channel.empty()) {
      if (!channels.count(options.channel)) {
        std::string list;
        for (const auto& ch : pos.channels) list += (list.empty() ? "" : ", ") + ch;
        throw InputError(where, std::nullopt,
                         fmt::format("position '{}' has no channel '{}' (channels: {})", name,
                                     options.channel, list.empty() ? "none" : list));
      }
      channel = options.channel;
    }
    const std::vector<long> zList(zs.begin(), zs.end());
    const long z = options.z ? *options.z : zList[zList.size() / 2];
    if (!zs.count(z))
      throw InputError(where, std::nullopt,
                       fmt::format("position '{}' has no focal plane {}", name, z));
    std::map<long, std::filesystem::path> byTime;
    for (const auto& e : entries) {
      if (e.channel != channel || e.z != z) continue;
      const auto [it, inserted] = byTime.emplace(e.time, e.path);
      if (!inserted)
        throw InputError(
            where, std::nullopt,
            fmt::format("two files for time {} of position '{}': {} and {}", e.time, name,
                        it->second.filename().string(), e.path.filename().string()));
    }
    long expected = byTime.begin()->first;
    for (const auto& [t, path] : byTime) {
      if (t != expected)
        throw InputError(where, std::nullopt,
                         fmt::format("position '{}': time point {} is missing (next file is {})",
                                     name, expected, path.filename().string()));
      pos.frames.push_back(path);
      pos.times.push_back(static_cast<int>(t));
      ++expected;
    }
    out.push_back(std::move(pos));
  }
  return out;
}

namespace {

class FolderSource final : public FrameSource {
 public:
  FolderSource(FolderPosition position, const OpenOptions& options)
      : position_(std::move(position)), options_(options) {
    info_.positionName = position_.name;
    info_.frames = static_cast<int>(position_.frames.size());
    if (info_.frames < options.minFrames)
      throw InputError(position_.folder.string(), std::nullopt,
                       fmt::format("position '{}' has {} frame{}; a time-lapse needs at least {}",
                                   position_.name, info_.frames, info_.frames == 1 ? "" : "s",
                                   options.minFrames));
    // Every file is opened once here so that a bad one is reported before any work.
    for (int k = 0; k < info_.frames; ++k) {
      const auto& path = position_.frames[static_cast<size_t>(k)];
      TiffFile f(path);
      if (f.pageCount() != 1)
        throw InputError(path.string(), k,
                         fmt::format("file has {} pages; a folder of frames needs one page per "
                                     "file",
                                     f.pageCount()));
      if (k == 0) {
        info_.width = f.width();
        info_.height = f.height();
        info_.bitsPerSample = f.bitsPerSample();
        info_.cvType = f.cvType();
        info_.metadata = parseImageDescription(f.description());
      } else if (f.width() != info_.width || f.height() != info_.height ||
                 f.bitsPerSample() != info_.bitsPerSample) {
        throw InputError(path.string(), k,
                         fmt::format("mixed frame sizes: {}x{} {}-bit but the first frame ({}) is "
                                     "{}x{} {}-bit",
                                     f.width(), f.height(), f.bitsPerSample(),
                                     position_.frames.front().filename().string(), info_.width,
                                     info_.height, info_.bitsPerSample));
      }
      info_.files.push_back({path, f.fileSize()});
    }
    // Per-file metadata describes one plane; only physical sizes and the
    // interval carry over to the series.
    auto& md = info_.metadata;
    md.sizeT = info_.frames;
    md.sizeC = std::max<int>(1, static_cast<int>(position_.channels.size()));
    md.sizeZ = 1;
    md.explicitPlanes.clear();
    md.channels = position_.channels;
    info_.channelName = options.channel.empty() && !position_.channels.empty()
                            ? position_.channels.front()
                            : options.channel;
    for (size_t i = 0; i < position_.channels.size(); ++i)
      if (position_.channels[i] == info_.channelName) info_.channel = static_cast<int>(i);
    info_.description = fmt::format(
        "folder of {} single-frame TIFFs of {}x{} {}-bit{}", info_.frames, info_.width,
        info_.height, info_.bitsPerSample,
        info_.channelName.empty() ? "" : fmt::format(", channel '{}'", info_.channelName));
  }

  const StackInfo& info() const override { return info_; }

  void read(int frame, cv::Mat& out) override {
    if (frame < 0 || frame >= info_.frames)
      throw InputError(position_.folder.string(), frame,
                       fmt::format("frame out of range (position has {})", info_.frames));
    if (openFrame_ != frame) {
      open_.reset();
      open_ = std::make_unique<TiffFile>(position_.frames[static_cast<size_t>(frame)]);
      openFrame_ = frame;
      if (open_->width() != info_.width || open_->height() != info_.height ||
          open_->bitsPerSample() != info_.bitsPerSample)
        throw InputError(open_->path().string(), frame, "file changed size since it was opened");
    }
    open_->readPage(0, out, frame);
  }

  std::unique_ptr<FrameSource> clone() const override {
    return std::make_unique<FolderSource>(*this);
  }

  FolderSource(const FolderSource& other)
      : FrameSource(), position_(other.position_), options_(other.options_), info_(other.info_) {}

 private:
  FolderPosition position_;
  OpenOptions options_;
  StackInfo info_;
  std::unique_ptr<TiffFile> open_;
  int openFrame_ = -1;
};

}  // namespace

std::unique_ptr<FrameSource> openFolderPosition(const FolderPosition& position,
                                                const OpenOptions& options) {
  return std::make_unique<FolderSource>(position, options);
}

}  // namespace budledger::io
