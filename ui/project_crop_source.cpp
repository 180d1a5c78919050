#include "ui/project_crop_source.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstring>
#include <filesystem>
#include <sstream>

#include "core/base/error.h"
#include "core/io/image_folder.h"
#include "core/traps/crops.h"

namespace budledger::ui {

struct ProjectCropSource::Position {
  int id = 0;
  std::string name;
  int frames = 0;
  std::map<int, cv::Point2d> centres;  // by trap id
  std::vector<cv::Point2d> drift;      // by frame
  std::unique_ptr<io::FrameSource> prototype;
  // Clones for worker threads: a clone serves one thread at a time.
  mutable std::mutex poolMutex;
  mutable std::vector<std::unique_ptr<io::FrameSource>> idle;
};

namespace {

double median(std::vector<double> v) {
  if (v.empty()) return 0;
  std::nth_element(v.begin(), v.begin() + static_cast<long>(v.size() / 2), v.end());
  return v[v.size() / 2];
}

std::unique_ptr<io::FrameSource> openInputs(store::Project& project,
                                            const store::PositionRecord& pos) {
  std::vector<std::filesystem::path> files;
  for (const auto& in : project.inputs())
    if (in.position == pos.id) files.emplace_back(in.path);
  if (files.empty())
    throw InputError(project.path(), std::nullopt,
                     fmt::format("position '{}' records no input images", pos.name));
  for (const auto& f : files)
    if (!std::filesystem::exists(f))
      throw InputError(
          f.string(), std::nullopt,
          fmt::format("input image of position '{}' is missing (moved or deleted?)", pos.name));
  io::OpenOptions open;
  if (auto ch = project.meta("position." + pos.name + ".channel")) open.channel = *ch;
  if (files.size() == 1) return io::openStack(files.front(), open);
  // A folder of single-frame files, in the recorded (time) order.
  io::FolderPosition fp;
  fp.name = pos.name;
  fp.folder = files.front().parent_path();
  fp.frames = files;
  for (size_t i = 0; i < files.size(); ++i) fp.times.push_back(static_cast<int>(i));
  return io::openFolderPosition(fp, open);
}

}  // namespace

cv::Rect ProjectCropSource::cropBoxFor(store::Project& project,
                                       const store::PositionRecord& position) {
  if (auto stored = project.meta("position." + position.name + ".crop_box")) {
    std::istringstream in(*stored);
    int x = 0, y = 0, w = 0, h = 0;
    if (in >> x >> y >> w >> h && w > 0 && h > 0) return {x, y, w, h};
  }
  // No stored box: the lattice cell, from the median spacing of neighbours
  // along a row and between rows (traps in a row share `row`).
  const auto traps = project.traps(position.id);
  std::map<std::pair<int, int>, cv::Point2d> at;
  for (const auto& t : traps) at[{t.row, t.col}] = {t.x, t.y};
  std::vector<double> dxs, dys;
  for (const auto& [rc, p] : at) {
    if (auto r = at.find({rc.first, rc.second + 1}); r != at.end())
      dxs.push_back(std::hypot(r->second.x - p.x, r->second.y - p.y));
    if (auto d = at.find({rc.first + 1, rc.second}); d != at.end())
      dys.push_back(std::hypot(d->second.x - p.x, d->second.y - p.y));
  }
  double w = median(dxs), h = median(dys);
  if (w <= 0) w = h;
  if (h <= 0) h = w;
  if (w <= 0) w = h = 64;  // a single trap: any sensible window
  const int iw = std::max(8, static_cast<int>(std::lround(w)));
  const int ih = std::max(8, static_cast<int>(std::lround(h)));
  return {-iw / 2, -ih / 2, iw, ih};
}

std::shared_ptr<ProjectCropSource> ProjectCropSource::open(store::Project& project,
                                                           ProjectCropOptions options) {
  std::shared_ptr<ProjectCropSource> src(new ProjectCropSource());
  src->options_ = options;
  const auto positions = project.positions();
  if (positions.empty())
    throw InputError(project.path(), std::nullopt, "the project has no positions yet");
  int w = 0, h = 0;
  for (const auto& pos : positions) {
    auto p = std::make_unique<Position>();
    p->id = pos.id;
    p->name = pos.name;
    p->frames = pos.frameCount;
    for (const auto& t : project.traps(pos.id)) p->centres[t.trap] = {t.x, t.y};
    p->drift.assign(static_cast<size_t>(std::max(0, pos.frameCount)), {0, 0});
    for (const auto& d : project.drift(pos.id))
      if (d.frame >= 0 && d.frame < pos.frameCount)
        p->drift[static_cast<size_t>(d.frame)] = {d.dx, d.dy};
    p->prototype = openInputs(project, pos);
    const cv::Rect box = cropBoxFor(project, pos);
    src->engineBoxes_[pos.id] = box;
    w = std::max(w, box.width);
    h = std::max(h, box.height);
    src->positions_.emplace(pos.id, std::move(p));
  }
  // One size for all, centred on the trap (the boxes are centred on it too).
  src->box_ = cv::Rect(-w / 2, -h / 2, w, h);
  return src;
}

ProjectCropSource::~ProjectCropSource() = default;

QPointF ProjectCropSource::measurementOrigin(int position) const {
  auto it = engineBoxes_.find(position);
  if (it == engineBoxes_.end()) return {0, 0};
  return {static_cast<double>(it->second.x - box_.x), static_cast<double>(it->second.y - box_.y)};
}

std::shared_ptr<const cv::Mat> ProjectCropSource::frame(const Position& p, int frame) const {
  {
    std::lock_guard lock(cacheMutex_);
    for (auto it = cache_.begin(); it != cache_.end(); ++it)
      if (it->position == p.id && it->frame == frame) {
        cache_.splice(cache_.begin(), cache_, it);
        return cache_.front().image;
      }
  }
  // Decode outside every lock, on a clone this thread has to itself.
  std::unique_ptr<io::FrameSource> source;
  {
    std::lock_guard lock(p.poolMutex);
    if (!p.idle.empty()) {
      source = std::move(p.idle.back());
      p.idle.pop_back();
    }
  }
  if (!source) source = p.prototype->clone();
  auto image = std::make_shared<cv::Mat>();
  try {
    source->read(frame, *image);
  } catch (...) {
    std::lock_guard lock(p.poolMutex);
    p.idle.push_back(std::move(source));
    throw;
  }
  {
    std::lock_guard lock(p.poolMutex);
    p.idle.push_back(std::move(source));
  }
  std::lock_guard lock(cacheMutex_);
  const std::size_t bytes = image->total() * image->elemSize();
  cache_.push_front({p.id, frame, image});
  cacheBytes_ += bytes;
  while (cacheBytes_ > options_.frameCacheBytes && cache_.size() > 1) {
    const auto& last = cache_.back();
    cacheBytes_ -= last.image->total() * last.image->elemSize();
    cache_.pop_back();
  }
  return image;
}

cv::Mat ProjectCropSource::cropMat(TrapId trap, int frameIndex) const {
  auto pit = positions_.find(trap.position);
  if (pit == positions_.end()) return {};
  const Position& p = *pit->second;
  auto cit = p.centres.find(trap.trap);
  if (cit == p.centres.end() || frameIndex < 0 || frameIndex >= p.frames) return {};
  const auto image = frame(p, frameIndex);
  cv::Mat out;
  traps::cropAt(*image, cit->second, p.drift[static_cast<size_t>(frameIndex)], box_,
                traps::CropSampling::Linear, out);
  return out;
}

QImage ProjectCropSource::crop(TrapId trap, int frameIndex) const {
  const cv::Mat m = cropMat(trap, frameIndex);
  if (m.empty()) return {};
  const bool wide = m.depth() == CV_16U;
  if (!wide && m.depth() != CV_8U) return {};
  QImage img(m.cols, m.rows, wide ? QImage::Format_Grayscale16 : QImage::Format_Grayscale8);
  for (int y = 0; y < m.rows; ++y)
    std::memcpy(img.scanLine(y), m.ptr(y), static_cast<size_t>(m.cols) * m.elemSize());
  return img;
}

}  // namespace budledger::ui
