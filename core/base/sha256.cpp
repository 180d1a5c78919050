#include "core/base/sha256.h"

#include <openssl/evp.h>

#include <array>
#include <fstream>
#include <stdexcept>

#include "core/base/error.h"

namespace budledger {
namespace {
EVP_MD_CTX* asCtx(void* p) { return static_cast<EVP_MD_CTX*>(p); }
}  // namespace

Sha256::Sha256() : ctx_(EVP_MD_CTX_new()) {
  if (!ctx_ || EVP_DigestInit_ex(asCtx(ctx_), EVP_sha256(), nullptr) != 1)
    throw std::runtime_error("SHA-256 initialisation failed");
}

Sha256::~Sha256() { EVP_MD_CTX_free(asCtx(ctx_)); }

void Sha256::update(std::string_view bytes) {
  EVP_DigestUpdate(asCtx(ctx_), bytes.data(), bytes.size());
}

std::string Sha256::finishHex() {
  std::array<unsigned char, EVP_MAX_MD_SIZE> md{};
  unsigned int len = 0;
  EVP_DigestFinal_ex(asCtx(ctx_), md.data(), &len);
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out;
  out.reserve(len * 2);
  for (unsigned int i = 0; i < len; ++i) {
    out.push_back(kHex[md[i] >> 4]);
    out.push_back(kHex[md[i] & 0xF]);
  }
  return out;
}

std::string sha256Hex(std::string_view bytes) {
  Sha256 h;
  h.update(bytes);
  return h.finishHex();
}

std::string sha256FileHex(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(file.string(), std::nullopt, "cannot open file");
  Sha256 h;
  std::array<char, 1 << 16> buf{};
  while (in) {
    in.read(buf.data(), buf.size());
    if (in.gcount() > 0) h.update(std::string_view(buf.data(), static_cast<size_t>(in.gcount())));
  }
  if (in.bad()) throw InputError(file.string(), std::nullopt, "read error");
  return h.finishHex();
}

}  // namespace budledger
