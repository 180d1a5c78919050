#include "ui/thumbnail_loader.h"

#include <QCoreApplication>
#include <QThread>
#include <algorithm>
#include <vector>

namespace budledger::ui {

ThumbnailLoader::ThumbnailLoader(std::shared_ptr<const CropSource> source,
                                 ThumbnailLoaderOptions options, QObject* parent)
    : QObject(parent), source_(std::move(source)), cache_(options.cacheBytes) {
  const int threads =
      options.threads > 0 ? options.threads : std::max(1, QThread::idealThreadCount() - 1);
  pool_.setMaxThreadCount(threads);
}

ThumbnailLoader::~ThumbnailLoader() {
  {
    std::lock_guard lock(mutex_);
    stopping_ = true;
    queue_.clear();
    queued_.clear();
  }
  pool_.waitForDone();
}

QImage ThumbnailLoader::fetch(const ThumbnailKey& key, bool* fresh) {
  const ThumbnailCache::Entry* e = cache_.find(key);
  const bool isFresh = e && e->levelsStamp == stamp_;
  if (fresh) *fresh = isFresh;
  if (!isFresh && source_) enqueue(key);
  return e ? e->image : QImage();
}

void ThumbnailLoader::setLevels(const DisplayLevels& levels) {
  const DisplayLevels n = levels.normalised();
  if (n == levels_) return;
  levels_ = n;
  ++stamp_;
  std::lock_guard lock(mutex_);
  // Queued jobs carry the old levels: forget them; fetch() re-queues what is still wanted.
  queue_.clear();
  queued_.clear();
}

void ThumbnailLoader::clear() {
  cache_.clear();
  std::lock_guard lock(mutex_);
  queue_.clear();
  queued_.clear();
}

int ThumbnailLoader::pendingJobs() const {
  std::lock_guard lock(mutex_);
  return static_cast<int>(queue_.size()) + running_ + delivering_;
}

void ThumbnailLoader::enqueue(const ThumbnailKey& key) {
  std::lock_guard lock(mutex_);
  if (stopping_ || queued_.contains(key)) return;
  queued_.insert(key);
  queue_.push_back({key, levels_, stamp_, pass_.load()});
  if (running_ < pool_.maxThreadCount()) {
    ++running_;
    pool_.start([this] { work(); });
  }
}

void ThumbnailLoader::work() {
  for (;;) {
    Job job;
    {
      std::lock_guard lock(mutex_);
      // Newest first; anything requested two or more passes ago is off screen.
      while (!queue_.empty() && queue_.front().pass + 1 < pass_.load()) {
        queued_.remove(queue_.front().key);
        queue_.pop_front();
      }
      if (queue_.empty() || stopping_) {
        --running_;
        return;
      }
      job = queue_.back();
      queue_.pop_back();
      ++delivering_;
    }
    QImage image;
    QString error;
    try {
      image = render(*source_, job.key, job.levels);
    } catch (const std::exception& e) {
      error = QString::fromStdString(e.what());
    }
    QMetaObject::invokeMethod(
        this,
        [this, key = job.key, image = std::move(image), stamp = job.stamp, error]() mutable {
          deliver(key, std::move(image), stamp, error);
        },
        Qt::QueuedConnection);
  }
}

void ThumbnailLoader::deliver(const ThumbnailKey& key, QImage image, int stamp,
                              const QString& error) {
  bool report = false;
  {
    std::lock_guard lock(mutex_);
    --delivering_;
    if (stamp == stamp_) queued_.remove(key);
    if (!error.isEmpty() && !reportedErrors_.contains(error)) {
      reportedErrors_.insert(error);
      report = true;
    }
  }
  if (report) emit failed(error);
  if (image.isNull()) return;
  cache_.insert(key, std::move(image), stamp);
  emit ready(key);
}

void ThumbnailLoader::waitForIdle() {
  while (pendingJobs() > 0) {
    pool_.waitForDone(20);
    QCoreApplication::sendPostedEvents(this);
  }
}

namespace {

// Mean grey along the trap axis over the middle third of the crop's width:
// wide enough to average out noise, narrow enough to stay inside the trap.
std::vector<double> axisProfile(const QImage& levelled) {
  const int w = levelled.width();
  const int x0 = w / 3;
  const int x1 = std::max(x0 + 1, w - w / 3);
  std::vector<double> out(static_cast<size_t>(levelled.height()));
  for (int y = 0; y < levelled.height(); ++y) {
    const uchar* row = levelled.constScanLine(y);
    double sum = 0;
    for (int x = x0; x < x1; ++x) sum += row[x];
    out[static_cast<size_t>(y)] = sum / (x1 - x0);
  }
  return out;
}

}  // namespace

QImage ThumbnailLoader::render(const CropSource& source, const ThumbnailKey& key,
                               const DisplayLevels& levels) {
  if (key.size.isEmpty()) return {};
  if (key.kind == ThumbnailKind::Crop) {
    const QImage levelled = applyLevels(source.crop(key.trap, key.frame), levels);
    if (levelled.isNull()) return {};
    // Converted here, off the UI thread, to the screen's own pixel format:
    // painting a grey image would convert it on every single paint.
    return levelled.scaled(key.size, Qt::KeepAspectRatio, Qt::SmoothTransformation)
        .convertToFormat(QImage::Format_RGB32);
  }
  // Kymograph tile: column i is the axis profile of frame key.frame + i.
  QImage tile(key.size, QImage::Format_Grayscale8);
  tile.fill(0x80);
  const int h = key.size.height();
  for (int i = 0; i < key.size.width(); ++i) {
    const QImage levelled = applyLevels(source.crop(key.trap, key.frame + i), levels);
    if (levelled.isNull()) continue;
    const std::vector<double> prof = axisProfile(levelled);
    const int n = static_cast<int>(prof.size());
    for (int y = 0; y < h; ++y) {
      // Linear resampling of the profile onto the tile height.
      const double s = (y + 0.5) * n / h - 0.5;
      const int a = std::clamp(static_cast<int>(std::floor(s)), 0, n - 1);
      const int b = std::min(a + 1, n - 1);
      const double t = std::clamp(s - a, 0.0, 1.0);
      const double v = prof[static_cast<size_t>(a)] * (1 - t) + prof[static_cast<size_t>(b)] * t;
      tile.scanLine(y)[i] = static_cast<uchar>(std::clamp(std::lround(v), 0L, 255L));
    }
  }
  return tile.convertToFormat(QImage::Format_RGB32);
}

}  // namespace budledger::ui
