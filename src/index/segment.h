// Encoding one segment (FORMAT.md, "Segment") and reading one in place from
// the mapped file.
//
// EncodeSegment is a pure function. SegmentView borrows the mapped bytes; it
// is immutable after Parse() and safe to share between threads.
#ifndef KINDRED_INDEX_SEGMENT_H_
#define KINDRED_INDEX_SEGMENT_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/types/span.h"
#include "index/codec.h"
#include "index/format.h"
#include "kindred/groups.h"
#include "kindred/index.h"

namespace kindred::index {

// One document to write; borrows everything.
struct SegmentDocument {
  std::string_view id;
  KeepFacts facts;
  absl::Span<const uint64_t> shingles;   // sorted, repeat-free
  absl::Span<const uint32_t> signature;  // settings.signature.perms slots
};

struct EncodedSegment {
  std::string head_and_body;  // segment header + body
  std::string commit;         // the commit record
};

// Encodes `docs` as segment `segment_number` whose first document has global
// number `first_doc`; `retired` lists (ascending) global numbers of earlier
// documents it replaces. Band keys use settings.bands x settings.rows.
// Requires ids of 1..kMaxIdLength bytes and signatures of perms slots.
EncodedSegment EncodeSegment(uint32_t segment_number, uint64_t first_doc,
                             absl::Span<const SegmentDocument> docs,
                             absl::Span<const uint64_t> retired, const IndexSettings& settings);

// What was found at an offset of the file.
enum class SegmentScan { kSegment, kTornTail, kCorrupt };

class SegmentView {
 public:
  // Parses the segment at `offset` of `file`, which follows `expected_number`
  // segments holding `expected_first_doc` documents. On kSegment fills the
  // view (tables verified); on kCorrupt *error says what and where.
  SegmentScan Parse(std::string_view file, uint64_t offset, uint32_t expected_number,
                    uint64_t expected_first_doc, uint32_t perms, absl::Status* error);

  const SegmentHeader& header() const { return header_; }
  uint64_t total_bytes() const { return total_bytes_; }
  uint32_t doc_count() const { return header_.doc_count; }

  DocRecord doc(uint32_t local) const {
    return DecodeDocRecord(doc_table_.substr(uint64_t{local} * kDocRecordSize));
  }
  std::string_view id(uint32_t local) const;
  absl::Span<const uint32_t> signature(uint32_t local) const {
    return absl::MakeConstSpan(signatures_ + uint64_t{local} * perms_, perms_);
  }
  uint32_t id_order(uint32_t i) const { return LoadU32(id_order_ + uint64_t{i} * 4); }
  uint64_t key_count() const { return header_.key_count; }
  const uint64_t* keys() const { return keys_; }
  const uint32_t* key_docs() const { return key_docs_; }
  uint64_t retired(uint64_t i) const { return LoadU64(retired_ + i * 8); }
  // The encoded shingle set of a document (unverified).
  std::string_view shingle_bytes(uint32_t local) const;
  // Byte range of a document's encoded shingle set in the file.
  uint64_t shingle_offset(uint32_t local) const {
    return offset_ + kSegmentHeaderSize + layout_.shingle_bytes + doc(local).shingles_offset;
  }
  uint64_t offset() const { return offset_; }
  // The zero padding after the shingle sets (checked by audit).
  std::string_view shingle_padding() const { return shingle_padding_; }

 private:
  // Points the section views into `body` (the verified segment body).
  void Bind(std::string_view body);
  absl::Status CheckTables(uint64_t offset);
  absl::Status CheckDocuments(uint64_t offset);

  SegmentHeader header_;
  SectionLayout layout_;
  uint32_t perms_ = 0;
  uint64_t total_bytes_ = 0;
  uint64_t offset_ = 0;
  std::string_view doc_table_, id_bytes_, shingles_, shingle_padding_;
  const char* id_order_ = nullptr;
  const uint32_t* signatures_ = nullptr;
  const uint64_t* keys_ = nullptr;
  const uint32_t* key_docs_ = nullptr;
  const char* retired_ = nullptr;
};

}  // namespace kindred::index

#endif  // KINDRED_INDEX_SEGMENT_H_
