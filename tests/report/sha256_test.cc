#include "porofit/report/sha256.h"

#include <gtest/gtest.h>

#include <algorithm>

#include "porofit/core/error.h"

#include <filesystem>
#include <fstream>
#include <string>

namespace porofit {
namespace {

// FIPS 180-2, Appendix B.1 (one-block message "abc").
TEST(Sha256, MatchesFipsOneBlockVector) {
  EXPECT_EQ(Sha256Hex("abc"), "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

// FIPS 180-2, Appendix B.2 (two-block 448-bit message).
TEST(Sha256, MatchesFipsTwoBlockVector) {
  EXPECT_EQ(Sha256Hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq"),
            "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

// Digest of the empty message (NIST CAVP SHA256ShortMsg.rsp, Len = 0; value from memory,
// it is also the widely published SHA-256 of an empty file).
TEST(Sha256, MatchesEmptyMessageVector) {
  EXPECT_EQ(Sha256Hex(""), "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

// FIPS 180-2, Appendix B.3 (one million 'a'), fed in uneven pieces to exercise buffering.
TEST(Sha256, MatchesFipsMillionAVectorWhenFedInPieces) {
  Sha256 h;
  const std::string chunk(997, 'a');
  size_t left = 1000000;
  size_t piece = 1;
  while (left > 0) {
    const size_t n = std::min({left, piece, chunk.size()});
    h.Update(chunk.data(), n);
    left -= n;
    piece = piece * 3 % 1000 + 1;
  }
  EXPECT_EQ(ToHex(h.Final()), "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
}

TEST(Sha256, FileDigestEqualsDigestOfContents) {
  const auto path = std::filesystem::temp_directory_path() / "porofit-sha256-test.bin";
  std::string bytes;
  for (int i = 0; i < 200000; ++i) bytes.push_back(static_cast<char>(i * 7 % 256));
  {
    std::ofstream out(path, std::ios::binary);
    out << bytes;
  }
  const FileDigest d = Sha256File(path.string());
  EXPECT_EQ(d.sha256, Sha256Hex(bytes));
  EXPECT_EQ(d.size, bytes.size());
  std::filesystem::remove(path);
}

TEST(Sha256, MissingFileIsAnInputErrorNamingThePath) {
  try {
    Sha256File("/nonexistent/porofit/file.yaml");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("/nonexistent/porofit/file.yaml"), std::string::npos);
  }
}

}  // namespace
}  // namespace porofit
