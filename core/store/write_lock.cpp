#include "core/store/write_lock.h"

#include <fcntl.h>
#include <fmt/format.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <array>
#include <cerrno>
#include <cstring>

#include "core/store/project.h"

namespace budledger::store {
namespace {

std::string readHolder(int fd) {
  std::array<char, 512> buf{};
  const auto n = pread(fd, buf.data(), buf.size() - 1, 0);
  std::string text = n > 0 ? std::string(buf.data(), static_cast<std::size_t>(n)) : "";
  while (!text.empty() && (text.back() == '\n' || text.back() == ' ')) text.pop_back();
  return text.empty() ? "another program" : text;
}

std::string hostName() {
  std::array<char, 256> host{};
  if (gethostname(host.data(), host.size() - 1) != 0) return "unknown host";
  return host.data();
}

}  // namespace

std::unique_ptr<WriteLock> WriteLock::tryAcquire(const std::string& projectPath,
                                                 std::string& holder) {
  const std::string path = sidecarPath(projectPath);
  // A releasing writer deletes the sidecar while holding it; if we locked a
  // file that was deleted under us, the lock means nothing: try again.
  for (int attempt = 0; attempt < 8; ++attempt) {
    const int fd = ::open(path.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd < 0) {
      holder = fmt::format("cannot create the lock file '{}': {}", path, std::strerror(errno));
      return nullptr;
    }
    if (flock(fd, LOCK_EX | LOCK_NB) != 0) {
      holder = errno == EWOULDBLOCK
                   ? readHolder(fd)
                   : fmt::format("cannot lock '{}': {}", path, std::strerror(errno));
      ::close(fd);
      return nullptr;
    }
    struct stat held {};
    struct stat named {};
    if (fstat(fd, &held) == 0 && stat(path.c_str(), &named) == 0 && held.st_ino == named.st_ino &&
        held.st_dev == named.st_dev) {
      const auto text =
          fmt::format("pid {} on host {} since {}\n", getpid(), hostName(), utcNowIso());
      if (ftruncate(fd, 0) == 0 && pwrite(fd, text.data(), text.size(), 0) < 0) {
        // The description is a courtesy for the banner; the lock itself holds.
      }
      return std::unique_ptr<WriteLock>(new WriteLock(path, fd));
    }
    ::close(fd);
  }
  holder = fmt::format("the lock file '{}' keeps changing under us", path);
  return nullptr;
}

WriteLock::~WriteLock() {
  ::unlink(path_.c_str());  // while still holding it (see tryAcquire)
  ::close(fd_);
}

}  // namespace budledger::store
