#include "ui/thumbnail_cache.h"

namespace budledger::ui {

size_t qHash(const ThumbnailKey& k, size_t seed) noexcept {
  return qHashMulti(seed, k.trap.position, k.trap.trap, k.frame, k.size.width(), k.size.height(),
                    static_cast<int>(k.kind));
}

const ThumbnailCache::Entry* ThumbnailCache::find(const ThumbnailKey& key) {
  auto it = index_.find(key);
  if (it == index_.end()) return nullptr;
  lru_.splice(lru_.begin(), lru_, it.value());
  return &it.value()->entry;
}

void ThumbnailCache::insert(const ThumbnailKey& key, QImage image, int levelsStamp) {
  auto it = index_.find(key);
  if (it != index_.end()) {
    bytes_ -= it.value()->entry.image.sizeInBytes();
    lru_.erase(it.value());
    index_.erase(it);
  }
  bytes_ += image.sizeInBytes();
  lru_.push_front({key, {std::move(image), levelsStamp}});
  index_.insert(key, lru_.begin());
  evict();
}

void ThumbnailCache::evict() {
  while (bytes_ > cap_ && lru_.size() > 1) {
    const Node& last = lru_.back();
    bytes_ -= last.entry.image.sizeInBytes();
    index_.remove(last.key);
    lru_.pop_back();
  }
}

void ThumbnailCache::clear() {
  lru_.clear();
  index_.clear();
  bytes_ = 0;
}

void ThumbnailCache::setCap(qint64 capBytes) {
  cap_ = capBytes;
  evict();
}

}  // namespace budledger::ui
