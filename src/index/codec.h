// Byte packing for the index file: every integer the index stores goes
// through these functions. Little-endian fixed widths and unsigned LEB128
// varints; decoders are bounds-checked and report failure instead of reading
// past their limit. See FORMAT.md.
//
// ByteWriter and ByteReader are single-threaded values.
#ifndef KINDRED_INDEX_CODEC_H_
#define KINDRED_INDEX_CODEC_H_

#include <bit>
#include <cstdint>
#include <cstring>
#include <string>
#include <string_view>
#include <vector>

#include "absl/types/span.h"

namespace kindred::index {

// Unaligned little-endian loads from memory the caller knows is in bounds.
inline uint32_t LoadU32(const char* p) {
  uint32_t v;
  std::memcpy(&v, p, 4);
  if constexpr (std::endian::native == std::endian::big) v = __builtin_bswap32(v);
  return v;
}
inline uint64_t LoadU64(const char* p) {
  uint64_t v;
  std::memcpy(&v, p, 8);
  if constexpr (std::endian::native == std::endian::big) v = __builtin_bswap64(v);
  return v;
}

// Little-endian stores into memory the caller has sized.
inline void StoreU32(char* p, uint32_t v) {
  if constexpr (std::endian::native == std::endian::big) v = __builtin_bswap32(v);
  std::memcpy(p, &v, 4);
}
inline void StoreU64(char* p, uint64_t v) {
  if constexpr (std::endian::native == std::endian::big) v = __builtin_bswap64(v);
  std::memcpy(p, &v, 8);
}

// Bytes of the LEB128 encoding of v (1..10).
inline size_t VarintLength(uint64_t v) {
  size_t n = 1;
  while (v >= 0x80) v >>= 7, ++n;
  return n;
}

// XXH3-64 with seed 0, the checksum of every persisted unit.
uint64_t Checksum(std::string_view bytes);

// Appends encoded values to a string it borrows.
class ByteWriter {
 public:
  explicit ByteWriter(std::string* out) : out_(out) {}

  void U8(uint8_t v) { out_->push_back(static_cast<char>(v)); }
  void U32(uint32_t v);
  void U64(uint64_t v);
  void F64(double v);
  void Varint(uint64_t v);
  void Bytes(std::string_view bytes) { out_->append(bytes); }
  // Appends zero bytes until the size is a multiple of 8.
  void PadTo8();
  size_t size() const { return out_->size(); }

 private:
  std::string* out_;
};

// Reads encoded values from a borrowed byte range. Every read returns false
// (and leaves the position unspecified) when the value does not fit in the
// remaining bytes or a varint is malformed.
class ByteReader {
 public:
  explicit ByteReader(std::string_view bytes) : bytes_(bytes) {}

  bool U8(uint8_t* v);
  bool U32(uint32_t* v);
  bool U64(uint64_t* v);
  bool F64(double* v);
  // At most 10 bytes; rejects values above 2^64-1 and overlong encodings.
  bool Varint(uint64_t* v);
  bool Bytes(size_t n, std::string_view* v);
  bool Skip(size_t n);

  size_t position() const { return pos_; }
  size_t remaining() const { return bytes_.size() - pos_; }

 private:
  std::string_view bytes_;
  size_t pos_ = 0;
};

// Encodes a sorted, repeat-free set as delta varints (FORMAT.md,
// shingle_bytes). Appends to *out.
void EncodeShingleSet(absl::Span<const uint64_t> set, std::string* out);

// Bytes EncodeShingleSet() writes for `set`.
size_t EncodedShingleSetLength(absl::Span<const uint64_t> set);

// Writes the encoding of `set` at `out`, which must have room for
// EncodedShingleSetLength(set) bytes; returns the end of what it wrote.
char* EncodeShingleSetTo(absl::Span<const uint64_t> set, char* out);

// Decodes exactly `count` hashes from `bytes`, which must be consumed
// exactly; checks that the hashes strictly ascend. Appends to *out; returns
// false on any malformation.
bool DecodeShingleSet(std::string_view bytes, uint32_t count, std::vector<uint64_t>* out);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_CODEC_H_
