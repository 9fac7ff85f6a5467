// Internal: SHA-1 (FIPS 180-4) and RFC 4648 base32, for the
// WARC-Payload-Digest field ("sha1:" + base32 of the 20-byte digest).
// SHA-1 is used here only to check that a payload is the one its writer
// recorded, not for security.
//
// Thread-compatible.
#ifndef KINDRED_IO_SHA1_H_
#define KINDRED_IO_SHA1_H_

#include <array>
#include <cstdint>
#include <string>

#include "absl/strings/string_view.h"

namespace kindred::io {

class Sha1 {
 public:
  Sha1();
  void Update(absl::string_view bytes);
  std::array<uint8_t, 20> Finish();

 private:
  void Block(const uint8_t* block);
  uint32_t h_[5];
  uint8_t pending_[64];
  size_t pending_size_ = 0;
  uint64_t total_ = 0;
};

// RFC 4648 base32 (upper case, with '=' padding).
std::string Base32(const uint8_t* bytes, size_t size);

// "sha1:<base32>" of `bytes`, the form WARC writers use.
std::string Sha1Digest(absl::string_view bytes);

}  // namespace kindred::io

#endif  // KINDRED_IO_SHA1_H_
