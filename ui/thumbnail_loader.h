#pragma once
// ThumbnailLoader: makes strip images off the UI thread and keeps them in a
// ThumbnailCache. The view asks fetch() for what it is about to paint; a miss
// (or an image made under older display levels) queues a job and the view
// paints a placeholder — or the stale image — until ready() arrives.
//
// Jobs run on a private QThreadPool, newest request first, because the newest
// requests are what is on screen now; requests from paint passes more than one
// pass old are dropped unstarted when the user has scrolled on. Results are
// handed back through queued calls, so the cache is touched on the UI thread
// only. The destructor drops the queue and waits for running jobs.
#include <QObject>
#include <QSet>
#include <QThreadPool>
#include <atomic>
#include <deque>
#include <memory>
#include <mutex>

#include "ui/crop_source.h"
#include "ui/display_levels.h"
#include "ui/thumbnail_cache.h"

namespace budledger::ui {

struct ThumbnailLoaderOptions {
  qint64 cacheBytes = 256LL << 20;  // 256 MiB
  int threads = 0;                  // 0: one less than the cores, at least one
};

class ThumbnailLoader : public QObject {
  Q_OBJECT

 public:
  static constexpr int kKymographTileFrames = 32;

  ThumbnailLoader(std::shared_ptr<const CropSource> source, ThumbnailLoaderOptions options = {},
                  QObject* parent = nullptr);
  ~ThumbnailLoader() override;

  const CropSource* source() const { return source_.get(); }
  // The cached image for `key` (null when none yet); queues a job when the
  // image is missing or `*fresh` would be false (made under older levels).
  QImage fetch(const ThumbnailKey& key, bool* fresh = nullptr);
  // Starts a new paint pass; see the class comment.
  void beginPass() { ++pass_; }
  void setLevels(const DisplayLevels& levels);
  const DisplayLevels& levels() const { return levels_; }
  void clear();

  // For tests and benchmarks: blocks until queued work is done and results
  // are in the cache (processes queued results on the calling, UI, thread).
  void waitForIdle();
  ThumbnailCache& cache() { return cache_; }
  int pendingJobs() const;

  // The levelled image for a key, computed on the calling thread (the loader's
  // job; public so the large trap view and tests use the same recipe).
  static QImage render(const CropSource& source, const ThumbnailKey& key,
                       const DisplayLevels& levels);

 signals:
  void ready(const budledger::ui::ThumbnailKey& key);
  // A crop could not be read (once per distinct message, so a missing file
  // does not flood the status bar).
  void failed(const QString& message);

 private:
  struct Job {
    ThumbnailKey key;
    DisplayLevels levels;
    int stamp = 0;
    quint64 pass = 0;
  };
  void enqueue(const ThumbnailKey& key);
  void work();
  void deliver(const ThumbnailKey& key, QImage image, int stamp, const QString& error);

  std::shared_ptr<const CropSource> source_;
  ThumbnailCache cache_;
  QThreadPool pool_;
  DisplayLevels levels_;
  int stamp_ = 1;
  std::atomic<quint64> pass_{0};

  mutable std::mutex mutex_;  // guards the fields below
  std::deque<Job> queue_;
  QSet<ThumbnailKey> queued_;  // queued or running, with the current stamp
  int running_ = 0;
  bool stopping_ = false;
  int delivering_ = 0;  // results posted but not yet delivered
  QSet<QString> reportedErrors_;
};

}  // namespace budledger::ui
