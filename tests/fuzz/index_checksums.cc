#include "index_checksums.h"

#include <xxhash.h>

#include <cstdint>
#include <cstring>

namespace kindred::fuzz {
namespace {

// Sizes and offsets from src/index/FORMAT.md.
constexpr uint64_t kFileHeaderMin = 64;
constexpr uint64_t kFileHeaderMax = 1024;
constexpr uint64_t kSegmentHeader = 64;
constexpr uint64_t kDocRecord = 56;
constexpr uint64_t kCommitRecord = 32;
constexpr uint64_t kLimit = uint64_t{1} << 40;
// Version 2: two 512-byte commit slots after a 512-byte header; segments
// from byte 1536.
constexpr uint64_t kSlotOffset[2] = {512, 1024};
constexpr uint64_t kSlotSize = 512;
constexpr uint64_t kDataStartV2 = 1536;  // larger sizes never fit a fuzz input

uint64_t Load(const std::string& bytes, uint64_t at, size_t width) {
  uint64_t value = 0;
  for (size_t i = 0; i < width; ++i) {
    value |= uint64_t{static_cast<unsigned char>(bytes[at + i])} << (8 * i);
  }
  return value;
}

void Store64(std::string* bytes, uint64_t at, uint64_t value) {
  for (size_t i = 0; i < 8; ++i) (*bytes)[at + i] = static_cast<char>(value >> (8 * i));
}

uint64_t Hash(const std::string& bytes, uint64_t at, uint64_t size) {
  return XXH3_64bits(bytes.data() + at, size);
}

uint64_t Pad8(uint64_t n) { return (n + 7) & ~uint64_t{7}; }

// Fixes one segment at `start`; returns its end, or 0 when it does not fit.
uint64_t FixSegment(std::string* file, uint64_t start, uint64_t perms) {
  const uint64_t size = file->size();
  if (start + kSegmentHeader > size) return 0;
  Store64(file, start + 56, Hash(*file, start, 56));
  const uint64_t docs = Load(*file, start + 8, 4);
  const uint64_t id_bytes = Load(*file, start + 24, 8);
  const uint64_t shingle_bytes = Load(*file, start + 32, 8);
  const uint64_t keys = Load(*file, start + 40, 8);
  const uint64_t retired = Load(*file, start + 48, 8);
  if (id_bytes > kLimit || shingle_bytes > kLimit || keys > kLimit || retired > kLimit) return 0;
  const uint64_t tables_end = docs * kDocRecord + Pad8(docs * 4) + Pad8(docs * perms * 4) +
                              keys * 8 + Pad8(keys * 4) + retired * 8 + Pad8(id_bytes);
  const uint64_t body = start + kSegmentHeader;
  const uint64_t shingles = body + tables_end;
  const uint64_t commit = shingles + Pad8(shingle_bytes);
  if (commit + kCommitRecord > size) return 0;
  for (uint64_t doc = 0; doc < docs; ++doc) {
    const uint64_t record = body + doc * kDocRecord;
    const uint64_t offset = Load(*file, record + 8, 8);
    const uint64_t length = Load(*file, record + 48, 4);
    if (offset <= shingle_bytes && length <= shingle_bytes - offset) {
      Store64(file, record + 16, Hash(*file, shingles + offset, length));
    }
  }
  Store64(file, commit + 16, Hash(*file, start, kSegmentHeader + tables_end));
  Store64(file, commit + 24, Hash(*file, commit, 24));
  return commit + kCommitRecord;
}

}  // namespace

void FixIndexChecksums(std::string* file) {
  if (file->size() < kFileHeaderMin) return;
  const uint64_t header_size = Load(*file, 12, 4);
  if (header_size < kFileHeaderMin || header_size > kFileHeaderMax || header_size % 8 != 0 ||
      header_size > file->size()) {
    return;
  }
  Store64(file, header_size - 8, Hash(*file, 0, header_size - 8));
  const uint64_t perms = Load(*file, 32, 4);
  if (perms > 4096) return;
  uint64_t offset = header_size;
  if (Load(*file, 8, 4) >= 2) {
    if (file->size() < kDataStartV2) return;
    for (uint64_t slot : kSlotOffset) {
      if (file->compare(slot, 4, "KCAS") == 0) {
        Store64(file, slot + kSlotSize - 8, Hash(*file, slot, kSlotSize - 8));
      }
    }
    offset = kDataStartV2;
  }
  while (offset < file->size()) {
    const uint64_t end = FixSegment(file, offset, perms);
    if (end == 0) return;
    offset = end;
  }
}

}  // namespace kindred::fuzz
