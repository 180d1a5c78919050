#include "core/base/sha256.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "core/base/error.h"

namespace budledger {
namespace {

// Check values: FIPS 180-2, Appendix B.1 and B.2 (SHA-256 examples), and the
// digest of the empty string (NIST CAVP short-message vectors).
TEST(Sha256, MatchesFipsExamples) {
  EXPECT_EQ(sha256Hex("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  EXPECT_EQ(sha256Hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  EXPECT_EQ(sha256Hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

TEST(Sha256, IncrementalEqualsOneShot) {
  Sha256 h;
  h.update("ab");
  h.update("c");
  EXPECT_EQ(h.finishHex(), sha256Hex("abc"));
}

TEST(Sha256, FileDigestStreamsLargeFiles) {
  const auto path = std::filesystem::temp_directory_path() / "budledger_sha_test.bin";
  std::string content(300000, 'x');
  { std::ofstream(path, std::ios::binary) << content; }
  EXPECT_EQ(sha256FileHex(path), sha256Hex(content));
  std::filesystem::remove(path);
}

TEST(Sha256, MissingFileNamesIt) {
  try {
    sha256FileHex("/nonexistent/budledger/file.tif");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("/nonexistent/budledger/file.tif"), std::string::npos);
  }
}

}  // namespace
}  // namespace budledger
