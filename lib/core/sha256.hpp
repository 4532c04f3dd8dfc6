// SHA-256 message digests (FIPS 180-4, "Secure Hash Standard", NIST 2015, sections 4.1.2,
// 4.2.2, 5.1.1, 6.2), used to record the checksum of every input file in an analysis report so
// that a result can be tied to the exact bytes it came from. Not for security purposes.
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <string_view>

namespace macroreal {

// Incremental hashing: update() any number of times, then hex_digest() (or digest()) once.
class Sha256 {
 public:
  Sha256();
  void update(const void* data, std::size_t size);
  void update(std::string_view text) { update(text.data(), text.size()); }
  // Finishes the message (padding and length); the object must not be updated afterwards.
  std::array<std::uint8_t, 32> digest();
  std::string hex_digest();  // 64 lower-case hex digits

 private:
  void compress(const std::uint8_t* block);
  std::array<std::uint32_t, 8> h_;
  std::array<std::uint8_t, 64> buffer_{};
  std::size_t buffered_ = 0;
  std::uint64_t length_bytes_ = 0;
  bool finished_ = false;
};

std::string sha256_hex(std::string_view bytes);
// Digest of a file's bytes, read in blocks. Throws InputError naming the file when it cannot be
// opened or read.
std::string sha256_file_hex(const std::string& path);

}  // namespace macroreal
