#pragma once
// WriteLock: at most one writer per project file, across processes and
// within one. The lock is an OS lock (flock) on a sidecar file
// "<project>.lock" that holds the writer's pid, host and start time as text,
// so that a second opener can say who holds it. The kernel drops the lock
// when the holder exits or crashes, so a stale sidecar never blocks anyone;
// a clean release deletes the sidecar. Invariant: while a WriteLock object
// exists, its process is the only writer of the project.
#include <memory>
#include <string>

namespace budledger::store {

class WriteLock {
 public:
  // Takes the lock, or returns nullptr and sets `holder` to a description of
  // who has it ("pid 4242 on host lab-pc since 2026-…Z") or why it cannot be
  // taken (a folder that is not writable).
  static std::unique_ptr<WriteLock> tryAcquire(const std::string& projectPath, std::string& holder);
  ~WriteLock();
  WriteLock(const WriteLock&) = delete;
  WriteLock& operator=(const WriteLock&) = delete;

  static std::string sidecarPath(const std::string& projectPath) { return projectPath + ".lock"; }

 private:
  WriteLock(std::string path, int fd) : path_(std::move(path)), fd_(fd) {}
  std::string path_;
  int fd_;
};

}  // namespace budledger::store
