#pragma once
// SHA-256 digests (OpenSSL libcrypto), as lowercase hex. Used for input file
// digests, the journal's hash chain and sign-off digests.
#include <cstddef>
#include <filesystem>
#include <string>
#include <string_view>

namespace budledger {

std::string sha256Hex(std::string_view bytes);
// Streams the file in blocks; throws InputError naming the file if unreadable.
std::string sha256FileHex(const std::filesystem::path& file);

// Incremental form for digests built from many pieces.
class Sha256 {
 public:
  Sha256();
  ~Sha256();
  Sha256(const Sha256&) = delete;
  Sha256& operator=(const Sha256&) = delete;
  void update(std::string_view bytes);
  std::string finishHex();

 private:
  void* ctx_;
};

}  // namespace budledger
