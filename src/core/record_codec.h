// The frame shared by the serialized records (src/core/RECORDS.md): a
// 24-byte header (magic "KNDR", a 4-byte record tag, version, flags, payload
// length), the payload of little-endian fixed-width fields, and an XXH3-64
// checksum of everything before it.
#ifndef KINDRED_CORE_RECORD_CODEC_H_
#define KINDRED_CORE_RECORD_CODEC_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"

namespace kindred::internal {

inline constexpr uint32_t kRecordVersion = 1;
inline constexpr size_t kRecordHeaderBytes = 24;
inline constexpr size_t kRecordTrailerBytes = 8;

// Builds one record: payload fields appended in order, then Finish().
class RecordBuilder {
 public:
  // `tag`: four ASCII characters naming the record type; `version`: the
  // format version of that record's payload.
  explicit RecordBuilder(std::string_view tag, uint32_t version = kRecordVersion);
  void U8(uint8_t value) { bytes_.push_back(static_cast<char>(value)); }
  void U32(uint32_t value);
  void U64(uint64_t value);
  // LEB128: 7 bits a byte, low first, the high bit set on all but the last.
  void Varint(uint64_t value) {
    while (value >= 0x80) {
      bytes_.push_back(static_cast<char>(value | 0x80));
      value >>= 7;
    }
    bytes_.push_back(static_cast<char>(value));
  }
  void Raw(std::string_view bytes) { bytes_.append(bytes); }
  // The low `count` (<= 8) bytes of `value`, little-endian.
  void Low(uint64_t value, int count) {
    for (int i = 0; i < count; ++i) bytes_.push_back(static_cast<char>(value >> (8 * i)));
  }
  void F64(double value);              // its IEEE 754 bits
  void Bytes(std::string_view value);  // u32 length, then the bytes
  void Reserve(size_t payload_bytes) { bytes_.reserve(bytes_.size() + payload_bytes + 8); }
  // The whole record (header with the payload length, payload, checksum).
  std::string Finish() &&;

 private:
  std::string bytes_;
};

// Reads one record's payload field by field. A read past the payload's end
// fails (returns false) and makes status() report truncation.
class RecordParser {
 public:
  // `what` names the record type in messages ("document table"). The
  // frame's version must be in [oldest, newest].
  RecordParser(std::string_view bytes, std::string_view tag, std::string_view what,
               uint32_t oldest = kRecordVersion, uint32_t newest = kRecordVersion);
  // The frame's own check (magic, tag, version, length, checksum), done by
  // the constructor. When not OK, every read fails.
  const absl::Status& status() const { return status_; }
  bool U8(uint8_t* value);
  bool U32(uint32_t* value);
  bool U64(uint64_t* value);
  // A LEB128 varint in its shortest form, of at most 64 bits; a longer form
  // or more bits make Finish() report a malformed varint.
  bool Varint(uint64_t* value);
  // `count` (<= 8) bytes, little-endian.
  bool Low(int count, uint64_t* value);
  bool F64(double* value);
  bool Bytes(std::string* value);
  // `count` bytes in place (valid while the record's bytes are).
  bool Take(size_t count, const char** data);
  // The frame's format version (valid when status() is OK).
  uint32_t version() const { return version_; }
  // Bytes of payload not yet read.
  size_t remaining() const { return payload_.size() - position_; }
  // A BadInput status "<what>: <message>" (for a check of the values read).
  absl::Status Corrupt(std::string_view message) const;
  // OK when the frame was intact, every read succeeded and the whole
  // payload was read.
  absl::Status Finish() const;

 private:
  std::string_view what_;
  std::string_view payload_;
  size_t position_ = 0;
  bool overrun_ = false;
  bool bad_varint_ = false;
  uint32_t version_ = 0;
  absl::Status status_;
};

}  // namespace kindred::internal

#endif  // KINDRED_CORE_RECORD_CODEC_H_
