// Constants and fixed structures of the index file. The byte layout, with
// the reasons for it, is documented in FORMAT.md beside this file; keep the
// two in step. Values marked "frozen" are persisted and never change.
#ifndef KINDRED_INDEX_FORMAT_H_
#define KINDRED_INDEX_FORMAT_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "kindred/index.h"

namespace kindred::index {

static_assert(std::endian::native == std::endian::little,
              "the index maps little-endian tables directly");

inline constexpr std::string_view kFileMagic{"KINDRED\x1a", 8};  // frozen
// The newest version this program reads and writes: 3 for files that store
// containment keys, else 2 (VersionFor); version 1 files (no commit area)
// are still read (FORMAT.md, "Version 1 files").
inline constexpr uint32_t kFormatVersion = 3;
// Where a version-3 header keeps its containment-key settings (FORMAT.md).
inline constexpr size_t kContainmentFieldsOffset = 488;
inline constexpr uint32_t kOldestFormatVersion = 1;
inline constexpr std::string_view kSegmentMagic{"KSEG", 4};  // frozen
inline constexpr std::string_view kCommitMagic{"KCMT", 4};   // frozen

inline constexpr size_t kFileHeaderFixedSize = 56;  // before the Unicode text
inline constexpr size_t kMaxFileHeaderSize = 1024;
inline constexpr size_t kMaxUnicodeVersionLength = 256;
inline constexpr size_t kSegmentHeaderSize = 64;
inline constexpr size_t kCommitRecordSize = 32;
inline constexpr size_t kDocRecordSize = 56;
inline constexpr uint32_t kMaxIdLength = 65535;
inline constexpr uint32_t kMaxDocuments = 0x7fffffff;
inline constexpr uint32_t kDocFlagHasPriority = 1;  // frozen: doc_table flags bit 0

inline uint64_t RoundUp8(uint64_t n) { return (n + 7) & ~uint64_t{7}; }

// The version a file with `settings` is written in: 3 when it stores
// containment keys, else 2 (readable by programs that know version 2).
uint32_t VersionFor(const IndexSettings& settings);

// File header <-> IndexSettings. `version` 0 is VersionFor(settings); tests
// give 1 to write a version 1 file.
std::string EncodeFileHeader(const IndexSettings& settings, uint32_t version = 0);
// Decodes the header at the start of `file`; *header_size gets its length,
// *version (when not null) the format version (1, 2 or 3). DataLoss for a bad
// magic, a short or damaged header; FailedPrecondition for a newer format
// version.
absl::Status DecodeFileHeader(std::string_view file, IndexSettings* settings, size_t* header_size,
                              uint32_t* version = nullptr);

struct SegmentHeader {
  uint32_t segment_number = 0;
  uint32_t doc_count = 0;
  uint32_t flags = 0;
  uint64_t first_doc = 0;
  uint64_t id_bytes = 0;
  uint64_t shingle_bytes = 0;
  uint64_t key_count = 0;
  uint64_t retired_count = 0;
};

// Offsets of the body sections from the start of the body (FORMAT.md).
struct SectionLayout {
  uint64_t doc_table = 0, id_order = 0, signatures = 0, band_keys = 0, band_docs = 0, retired = 0,
           id_bytes = 0, shingle_bytes = 0;
  uint64_t tables_end = 0;   // end of the checksummed tables (padded id bytes)
  uint64_t body_length = 0;  // whole body
};

// Fails (false) when the sizes overflow 64 bits or exceed `limit` bytes.
bool ComputeLayout(const SegmentHeader& header, uint32_t perms, uint64_t limit,
                   SectionLayout* layout);

void EncodeSegmentHeader(const SegmentHeader& header, std::string* out);
// `bytes` must hold at least kSegmentHeaderSize bytes. False on a bad magic
// or checksum.
bool DecodeSegmentHeader(std::string_view bytes, SegmentHeader* header);

struct CommitRecord {
  uint32_t segment_number = 0;
  uint64_t body_length = 0;
  uint64_t tables_checksum = 0;
};

void EncodeCommitRecord(const CommitRecord& record, std::string* out);
// `bytes` must hold kCommitRecordSize bytes. False on a bad magic or checksum.
bool DecodeCommitRecord(std::string_view bytes, CommitRecord* record);

struct DocRecord {
  uint64_t id_offset = 0;
  uint64_t shingles_offset = 0;
  uint64_t shingles_checksum = 0;
  uint64_t text_length = 0;
  double priority = 0;
  uint32_t id_length = 0;
  uint32_t shingle_count = 0;
  uint32_t shingles_length = 0;
  uint32_t flags = 0;
};

void EncodeDocRecord(const DocRecord& record, std::string* out);
// Writes the kDocRecordSize bytes of `record` at `out`.
void StoreDocRecord(const DocRecord& record, char* out);
// `bytes` must hold kDocRecordSize bytes.
DocRecord DecodeDocRecord(std::string_view bytes);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_FORMAT_H_
