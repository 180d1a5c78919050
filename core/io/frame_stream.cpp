#include "core/io/frame_stream.h"

namespace budledger::io {

FrameStream::FrameStream(const FrameSource& source, const StreamOptions& options)
    : source_(source.clone()),
      first_(options.first),
      last_(options.last < 0 ? source.info().frames : options.last) {
  // One slot more than the look-ahead: the consumer holds one while reading it.
  const int slots = std::max(options.depth, 1) + 1;
  slots_.resize(static_cast<size_t>(slots));
  slotFrame_.assign(static_cast<size_t>(slots), -1);
  thread_ = std::thread([this] { run(); });
}

FrameStream::~FrameStream() {
  {
    std::lock_guard lock(mutex_);
    stop_ = true;
  }
  freed_.notify_all();
  thread_.join();
}

void FrameStream::run() {
  const long n = static_cast<long>(slots_.size());
  try {
    for (int frame = first_; frame < last_; ++frame) {
      size_t slot = 0;
      {
        std::unique_lock lock(mutex_);
        // A slot is free when it has been consumed and released.
        freed_.wait(lock, [&] { return stop_ || produced_ - consumed_ + (holding_ ? 1 : 0) < n; });
        if (stop_) return;
        slot = static_cast<size_t>(produced_ % n);
      }
      source_->read(frame, slots_[slot]);
      {
        std::lock_guard lock(mutex_);
        slotFrame_[slot] = frame;
        ++produced_;
      }
      filled_.notify_one();
    }
  } catch (...) {
    std::lock_guard lock(mutex_);
    error_ = std::current_exception();
  }
  {
    std::lock_guard lock(mutex_);
    finished_ = true;
  }
  filled_.notify_one();
}

const cv::Mat* FrameStream::next(int* index) {
  const long n = static_cast<long>(slots_.size());
  std::unique_lock lock(mutex_);
  if (holding_) {
    holding_ = false;
    freed_.notify_one();
  }
  filled_.wait(lock, [&] { return produced_ > consumed_ || finished_; });
  if (produced_ == consumed_) {
    if (error_) std::rethrow_exception(error_);
    return nullptr;
  }
  const size_t slot = static_cast<size_t>(consumed_ % n);
  ++consumed_;
  holding_ = true;
  if (index) *index = slotFrame_[slot];
  return &slots_[slot];
}

}  // namespace budledger::io
