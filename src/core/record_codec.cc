#include "core/record_codec.h"

#include <bit>
#include <cstring>

#include "absl/strings/str_cat.h"
#include "kindred/errors.h"
#include "xxhash.h"

namespace kindred::internal {
namespace {

constexpr std::string_view kMagic = "KNDR";

void PutU32(std::string* out, uint32_t value) {
  for (int i = 0; i < 4; ++i) out->push_back(static_cast<char>(value >> (8 * i)));
}
void PutU64(std::string* out, uint64_t value) {
  for (int i = 0; i < 8; ++i) out->push_back(static_cast<char>(value >> (8 * i)));
}
uint64_t GetLe(const char* data, int bytes) {
  uint64_t value = 0;
  for (int i = 0; i < bytes; ++i) value |= uint64_t{static_cast<uint8_t>(data[i])} << (8 * i);
  return value;
}

}  // namespace

RecordBuilder::RecordBuilder(std::string_view tag, uint32_t version) {
  bytes_.append(kMagic);
  bytes_.append(tag.substr(0, 4));
  PutU32(&bytes_, version);
  PutU32(&bytes_, 0);  // flags
  PutU64(&bytes_, 0);  // payload length, set by Finish
}

void RecordBuilder::U32(uint32_t value) { PutU32(&bytes_, value); }
void RecordBuilder::U64(uint64_t value) { PutU64(&bytes_, value); }
void RecordBuilder::F64(double value) { PutU64(&bytes_, std::bit_cast<uint64_t>(value)); }
void RecordBuilder::Bytes(std::string_view value) {
  PutU32(&bytes_, static_cast<uint32_t>(value.size()));
  bytes_.append(value);
}

std::string RecordBuilder::Finish() && {
  const uint64_t length = bytes_.size() - kRecordHeaderBytes;
  for (int i = 0; i < 8; ++i) bytes_[16 + i] = static_cast<char>(length >> (8 * i));
  PutU64(&bytes_, XXH3_64bits(bytes_.data(), bytes_.size()));
  return std::move(bytes_);
}

RecordParser::RecordParser(std::string_view bytes, std::string_view tag, std::string_view what,
                           uint32_t oldest, uint32_t newest)
    : what_(what) {
  if (bytes.size() < kRecordHeaderBytes + kRecordTrailerBytes) {
    status_ = Corrupt(absl::StrCat("truncated: ", bytes.size(), " bytes, shorter than a record's ",
                                   kRecordHeaderBytes + kRecordTrailerBytes, "-byte frame"));
    return;
  }
  if (bytes.substr(0, 4) != kMagic || bytes.substr(4, 4) != tag) {
    status_ =
        Corrupt(absl::StrCat("not a ", std::string(what), " record (its first bytes are not \"",
                             std::string(kMagic), std::string(tag), "\")"));
    return;
  }
  const uint64_t version = GetLe(bytes.data() + 8, 4);
  if (version < oldest || version > newest) {
    status_ =
        Corrupt(absl::StrCat("format version ", version, " (this build reads ",
                             oldest == newest ? absl::StrCat("version ", newest)
                                              : absl::StrCat("versions ", oldest, " to ", newest),
                             ")"));
    return;
  }
  version_ = static_cast<uint32_t>(version);
  const uint64_t length = GetLe(bytes.data() + 16, 8);
  const uint64_t whole = bytes.size() - kRecordHeaderBytes - kRecordTrailerBytes;
  if (length != whole) {
    status_ = Corrupt(absl::StrCat(length > whole ? "truncated" : "trailing bytes", ": ",
                                   bytes.size(), " bytes, the header says ",
                                   length + kRecordHeaderBytes + kRecordTrailerBytes));
    return;
  }
  const size_t body = bytes.size() - kRecordTrailerBytes;
  if (XXH3_64bits(bytes.data(), body) != GetLe(bytes.data() + body, 8)) {
    status_ = Corrupt("checksum mismatch (the bytes were damaged)");
    return;
  }
  if (GetLe(bytes.data() + 12, 4) != 0) {
    status_ = Corrupt("unknown flags set in the header");
    return;
  }
  payload_ = bytes.substr(kRecordHeaderBytes, length);
}

bool RecordParser::Take(size_t count, const char** data) {
  if (!status_.ok() || overrun_ || payload_.size() - position_ < count) {
    overrun_ = true;
    return false;
  }
  *data = payload_.data() + position_;
  position_ += count;
  return true;
}

bool RecordParser::U8(uint8_t* value) {
  const char* data;
  if (!Take(1, &data)) return false;
  *value = static_cast<uint8_t>(data[0]);
  return true;
}
bool RecordParser::U32(uint32_t* value) {
  const char* data;
  if (!Take(4, &data)) return false;
  *value = static_cast<uint32_t>(GetLe(data, 4));
  return true;
}
bool RecordParser::U64(uint64_t* value) {
  const char* data;
  if (!Take(8, &data)) return false;
  *value = GetLe(data, 8);
  return true;
}
bool RecordParser::Varint(uint64_t* value) {
  uint64_t result = 0;
  for (int shift = 0;; shift += 7) {
    const char* data;
    if (!Take(1, &data)) return false;
    const uint64_t byte = static_cast<uint8_t>(data[0]);
    // The tenth byte may carry only the 64th bit; a last byte of 0 after
    // others is a longer form than needed.
    if ((shift == 63 && byte > 1) || (shift > 0 && byte == 0)) {
      bad_varint_ = overrun_ = true;
      return false;
    }
    result |= (byte & 0x7f) << shift;
    if (byte < 0x80) break;
  }
  *value = result;
  return true;
}
bool RecordParser::Low(int count, uint64_t* value) {
  const char* data;
  if (!Take(static_cast<size_t>(count), &data)) return false;
  *value = GetLe(data, count);
  return true;
}
bool RecordParser::F64(double* value) {
  uint64_t bits;
  if (!U64(&bits)) return false;
  *value = std::bit_cast<double>(bits);
  return true;
}
bool RecordParser::Bytes(std::string* value) {
  uint32_t size;
  const char* data;
  if (!U32(&size) || !Take(size, &data)) return false;
  value->assign(data, size);
  return true;
}

absl::Status RecordParser::Corrupt(std::string_view message) const {
  return BadInput(absl::StrCat(std::string(what_), ": ", std::string(message)));
}

absl::Status RecordParser::Finish() const {
  if (!status_.ok()) return status_;
  if (bad_varint_) return Corrupt("a varint longer than its shortest form or than 64 bits");
  if (overrun_) return Corrupt("payload ends inside a field (its counts are damaged)");
  if (position_ != payload_.size()) {
    return Corrupt(absl::StrCat(payload_.size() - position_, " bytes left after the last field"));
  }
  return absl::OkStatus();
}

}  // namespace kindred::internal
