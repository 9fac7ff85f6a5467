#include "index/codec.h"

#include <xxhash.h>

#include <bit>
#include <vector>

namespace kindred::index {

uint64_t Checksum(std::string_view bytes) { return XXH3_64bits(bytes.data(), bytes.size()); }

void ByteWriter::U32(uint32_t v) {
  for (int i = 0; i < 4; ++i) U8(static_cast<uint8_t>(v >> (8 * i)));
}

void ByteWriter::U64(uint64_t v) {
  for (int i = 0; i < 8; ++i) U8(static_cast<uint8_t>(v >> (8 * i)));
}

void ByteWriter::F64(double v) { U64(std::bit_cast<uint64_t>(v)); }

void ByteWriter::Varint(uint64_t v) {
  while (v >= 0x80) {
    U8(static_cast<uint8_t>(v | 0x80));
    v >>= 7;
  }
  U8(static_cast<uint8_t>(v));
}

void ByteWriter::PadTo8() {
  while (out_->size() % 8 != 0) out_->push_back('\0');
}

bool ByteReader::U8(uint8_t* v) {
  if (remaining() < 1) return false;
  *v = static_cast<uint8_t>(bytes_[pos_++]);
  return true;
}

bool ByteReader::U32(uint32_t* v) {
  if (remaining() < 4) return false;
  *v = LoadU32(bytes_.data() + pos_);
  pos_ += 4;
  return true;
}

bool ByteReader::U64(uint64_t* v) {
  if (remaining() < 8) return false;
  *v = LoadU64(bytes_.data() + pos_);
  pos_ += 8;
  return true;
}

bool ByteReader::F64(double* v) {
  uint64_t bits;
  if (!U64(&bits)) return false;
  *v = std::bit_cast<double>(bits);
  return true;
}

bool ByteReader::Varint(uint64_t* v) {
  uint64_t result = 0;
  for (int shift = 0; shift < 64; shift += 7) {
    uint8_t byte;
    if (!U8(&byte)) return false;
    uint64_t bits = byte & 0x7f;
    // The tenth byte may carry only the top bit of a 64-bit value.
    if (shift == 63 && bits > 1) return false;
    result |= bits << shift;
    if ((byte & 0x80) == 0) {
      // Overlong: a final zero byte after the first adds nothing.
      if (byte == 0 && shift > 0) return false;
      *v = result;
      return true;
    }
  }
  return false;
}

bool ByteReader::Bytes(size_t n, std::string_view* v) {
  if (remaining() < n) return false;
  *v = bytes_.substr(pos_, n);
  pos_ += n;
  return true;
}

bool ByteReader::Skip(size_t n) {
  if (remaining() < n) return false;
  pos_ += n;
  return true;
}

void EncodeShingleSet(absl::Span<const uint64_t> set, std::string* out) {
  ByteWriter writer(out);
  uint64_t previous = 0;
  for (uint64_t hash : set) {
    writer.Varint(hash - previous);
    previous = hash;
  }
}

size_t EncodedShingleSetLength(absl::Span<const uint64_t> set) {
  size_t length = 0;
  uint64_t previous = 0;
  for (uint64_t hash : set) {
    length += VarintLength(hash - previous);
    previous = hash;
  }
  return length;
}

char* EncodeShingleSetTo(absl::Span<const uint64_t> set, char* out) {
  uint64_t previous = 0;
  for (uint64_t hash : set) {
    uint64_t v = hash - previous;
    previous = hash;
    while (v >= 0x80) {
      *out++ = static_cast<char>(v | 0x80);
      v >>= 7;
    }
    *out++ = static_cast<char>(v);
  }
  return out;
}

bool DecodeShingleSet(std::string_view bytes, uint32_t count, std::vector<uint64_t>* out) {
  ByteReader reader(bytes);
  uint64_t previous = 0;
  for (uint32_t i = 0; i < count; ++i) {
    uint64_t delta;
    if (!reader.Varint(&delta)) return false;
    if (i > 0 && delta == 0) return false;            // repeats are not allowed
    if (delta > UINT64_MAX - previous) return false;  // would wrap around
    previous += delta;
    out->push_back(previous);
  }
  return reader.remaining() == 0;
}

}  // namespace kindred::index
