#pragma once
// ThumbnailCache: least-recently-used store of ready-to-paint strip images
// keyed by (trap, frame, size, kind), bounded by a memory cap in bytes.
// Used on the UI thread only (the loader's workers hand results back to it).
// Invariants: bytes() <= cap() after every insert, except that a single image
// larger than the cap is kept alone so the newest request is never lost.
#include <QHash>
#include <QImage>
#include <QSize>
#include <list>

#include "ui/review_event.h"

namespace budledger::ui {

enum class ThumbnailKind : quint8 {
  Crop,           // one frame's crop, levelled and scaled to `size`
  KymographTile,  // `tileFrames` frames from `frame`, one profile column each
};

struct ThumbnailKey {
  TrapId trap;
  int frame = 0;
  QSize size;  // device pixels
  ThumbnailKind kind = ThumbnailKind::Crop;
  friend bool operator==(const ThumbnailKey&, const ThumbnailKey&) = default;
};

size_t qHash(const ThumbnailKey& k, size_t seed = 0) noexcept;

class ThumbnailCache {
 public:
  struct Entry {
    QImage image;
    int levelsStamp = 0;  // which display levels made it
  };

  explicit ThumbnailCache(qint64 capBytes) : cap_(capBytes) {}

  // Marks the entry most recently used; nullptr when absent.
  const Entry* find(const ThumbnailKey& key);
  void insert(const ThumbnailKey& key, QImage image, int levelsStamp);
  void clear();
  void setCap(qint64 capBytes);

  qint64 cap() const { return cap_; }
  qint64 bytes() const { return bytes_; }
  int count() const { return static_cast<int>(index_.size()); }

 private:
  struct Node {
    ThumbnailKey key;
    Entry entry;
  };
  void evict();
  qint64 cap_;
  qint64 bytes_ = 0;
  std::list<Node> lru_;  // front = most recent
  QHash<ThumbnailKey, std::list<Node>::iterator> index_;
};

}  // namespace budledger::ui
