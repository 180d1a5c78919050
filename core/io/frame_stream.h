#pragma once
// FrameStream: decodes frames of a source in order on a background thread
// into a fixed ring of buffers, so that decoding overlaps the consumer's work.
// Memory is `depth` frames whatever the length of the movie. The stream owns
// its own clone of the source (libtiff handles are per thread). An error while
// decoding is rethrown by next() in the consumer's thread; destroying the
// stream stops the reader.
#include <condition_variable>
#include <exception>
#include <memory>
#include <mutex>
#include <thread>
#include <vector>

#include <opencv2/core.hpp>

#include "core/io/frame_source.h"

namespace budledger::io {

struct StreamOptions {
  int depth = 3;  // decoded frames buffered ahead of the consumer
  int first = 0;  // first frame
  int last = -1;  // one past the last frame; -1 = all
};

class FrameStream {
 public:
  FrameStream(const FrameSource& source, const StreamOptions& options = {});
  ~FrameStream();
  FrameStream(const FrameStream&) = delete;
  FrameStream& operator=(const FrameStream&) = delete;

  // The next frame in order, or nullptr after the last. The frame stays valid
  // until the following call; `index` receives its frame number.
  const cv::Mat* next(int* index = nullptr);

 private:
  void run();

  std::unique_ptr<FrameSource> source_;
  int first_, last_;
  std::vector<cv::Mat> slots_;
  std::vector<int> slotFrame_;
  std::mutex mutex_;
  std::condition_variable filled_, freed_;
  long produced_ = 0;  // frames written into slots so far
  long consumed_ = 0;  // frames handed to the consumer so far
  bool holding_ = false;
  bool stop_ = false;
  bool finished_ = false;
  std::exception_ptr error_;
  std::thread thread_;
};

}  // namespace budledger::io
