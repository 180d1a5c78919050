#include "core/pipeline/digest.h"

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <memory>
#include <vector>

#include "core/base/error.h"
#include "core/base/sha256.h"

namespace budledger::pipeline {

std::string digestFile(const std::filesystem::path& file, const std::atomic<bool>& cancelled) {
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::fopen(file.c_str(), "rb"), &std::fclose);
  if (!f)
    throw InputError(file.string(), std::nullopt,
                     std::string("cannot read file for its digest: ") + std::strerror(errno));
  Sha256 sha;
  std::vector<char> block(1 << 20);
  for (;;) {
    if (cancelled.load(std::memory_order_relaxed)) return {};
    const size_t n = std::fread(block.data(), 1, block.size(), f.get());
    if (n > 0) sha.update(std::string_view(block.data(), n));
    if (n < block.size()) {
      if (std::ferror(f.get()))
        throw InputError(file.string(), std::nullopt, "read error while computing its digest");
      break;
    }
  }
  return sha.finishHex();
}

}  // namespace budledger::pipeline
