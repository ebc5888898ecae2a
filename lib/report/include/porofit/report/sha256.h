#pragma once
// SHA-256 (FIPS 180-4, §6.2) for provenance digests of input files.
#include <array>
#include <cstdint>
#include <string>
#include <string_view>

namespace porofit {

/// Incremental SHA-256. Update() any number of times, then Final() once.
class Sha256 {
 public:
  Sha256();
  void Update(const void* data, size_t size);
  void Update(std::string_view s) { Update(s.data(), s.size()); }
  /// The 32-byte digest. The object must not be updated afterwards.
  std::array<std::uint8_t, 32> Final();

 private:
  void Block(const std::uint8_t* p);
  std::array<std::uint32_t, 8> h_;
  std::array<std::uint8_t, 64> buf_{};
  size_t buffered_ = 0;
  std::uint64_t total_bytes_ = 0;
};

/// Lower-case hex of a digest.
std::string ToHex(const std::array<std::uint8_t, 32>& digest);
/// Hex SHA-256 of a byte string.
std::string Sha256Hex(std::string_view bytes);

struct FileDigest {
  std::string sha256;      ///< lower-case hex
  std::uint64_t size = 0;  ///< bytes
};
/// Digest of a whole file, read in binary. Throws porofit::InputError naming
/// the path if the file cannot be opened or read.
FileDigest Sha256File(const std::string& path);

}  // namespace porofit
