#include "index/segment.h"

#include <algorithm>
#include <cstring>
#include <numeric>

#include "absl/strings/str_format.h"
#include "index/key_table.h"
#include "kindred/banding.h"

namespace kindred::index {
namespace {

bool AllZero(std::string_view bytes) {
  return std::all_of(bytes.begin(), bytes.end(), [](char c) { return c == 0; });
}

// Writes document `i` (its doc_table record, id, signature and shingle set)
// into `body`, laid out per `layout`; `shingle_end` holds the prefix sums of
// the encoded set lengths, *id_offset the running id position.
void WriteDocument(const SegmentDocument& doc, uint32_t i, const SectionLayout& layout,
                   absl::Span<const uint64_t> shingle_end, uint32_t perms, uint64_t* id_offset,
                   char* body) {
  char* set = body + layout.shingle_bytes + shingle_end[i];
  EncodeShingleSetTo(doc.shingles, set);
  DocRecord record;
  record.id_offset = *id_offset;
  record.id_length = static_cast<uint32_t>(doc.id.size());
  record.shingles_offset = shingle_end[i];
  record.shingles_length = static_cast<uint32_t>(shingle_end[i + 1] - shingle_end[i]);
  record.shingles_checksum = Checksum(std::string_view(set, record.shingles_length));
  record.shingle_count = static_cast<uint32_t>(doc.shingles.size());
  record.text_length = doc.facts.length;
  record.priority = doc.facts.priority;
  record.flags = doc.facts.has_priority ? kDocFlagHasPriority : 0;
  StoreDocRecord(record, body + layout.doc_table + uint64_t{i} * kDocRecordSize);
  std::memcpy(body + layout.id_bytes + *id_offset, doc.id.data(), doc.id.size());
  *id_offset += doc.id.size();
  char* signature = body + layout.signatures + uint64_t{i} * perms * 4;
  for (uint32_t slot = 0; slot < perms; ++slot) StoreU32(signature + 4 * slot, doc.signature[slot]);
}

// Writes the id order, band-key and retired tables into `body`.
void WriteTables(absl::Span<const SegmentDocument> docs, absl::Span<const KeyRow> keys,
                 absl::Span<const uint64_t> retired, const SectionLayout& layout, char* body) {
  std::vector<uint32_t> order(docs.size());
  std::iota(order.begin(), order.end(), 0);
  std::sort(order.begin(), order.end(),
            [&](uint32_t a, uint32_t b) { return docs[a].id < docs[b].id; });
  for (size_t i = 0; i < order.size(); ++i) StoreU32(body + layout.id_order + 4 * i, order[i]);
  for (size_t i = 0; i < keys.size(); ++i) {
    StoreU64(body + layout.band_keys + 8 * i, keys[i].first);
    StoreU32(body + layout.band_docs + 4 * i, keys[i].second);
  }
  for (size_t i = 0; i < retired.size(); ++i) StoreU64(body + layout.retired + 8 * i, retired[i]);
}

}  // namespace

EncodedSegment EncodeSegment(uint32_t segment_number, uint64_t first_doc,
                             absl::Span<const SegmentDocument> docs,
                             absl::Span<const uint64_t> retired, const IndexSettings& settings) {
  const uint32_t count = static_cast<uint32_t>(docs.size());
  SegmentHeader header{segment_number, count, 0, first_doc, 0, 0, 0, retired.size()};
  // Sizes first, so the segment is laid out in one buffer sized once.
  std::vector<uint64_t> shingle_end(count + 1, 0);
  for (uint32_t i = 0; i < count; ++i) {
    header.id_bytes += docs[i].id.size();
    shingle_end[i + 1] = shingle_end[i] + EncodedShingleSetLength(docs[i].shingles);
  }
  header.shingle_bytes = shingle_end[count];
  const KeyTable keys = BuildKeyTable(StoredKeyPlan(settings), 0, count, [&](uint32_t i) {
    return KeyedDocument{docs[i].signature, static_cast<uint32_t>(docs[i].shingles.size())};
  });
  header.key_count = keys.size();
  SectionLayout layout;
  ComputeLayout(header, settings.signature.perms, UINT64_MAX, &layout);

  EncodedSegment out;
  out.head_and_body.resize(kSegmentHeaderSize + layout.body_length);  // zero padding
  std::string head;
  EncodeSegmentHeader(header, &head);
  std::memcpy(out.head_and_body.data(), head.data(), kSegmentHeaderSize);
  char* body = out.head_and_body.data() + kSegmentHeaderSize;
  uint64_t id_offset = 0;
  for (uint32_t i = 0; i < count; ++i) {
    WriteDocument(docs[i], i, layout, shingle_end, settings.signature.perms, &id_offset, body);
  }
  WriteTables(docs, keys, retired, layout, body);
  uint64_t tables_checksum = Checksum(
      std::string_view(out.head_and_body).substr(0, kSegmentHeaderSize + layout.tables_end));
  EncodeCommitRecord(CommitRecord{segment_number, layout.body_length, tables_checksum},
                     &out.commit);
  return out;
}

SegmentScan SegmentView::Parse(std::string_view file, uint64_t offset, uint32_t expected_number,
                               uint64_t expected_first_doc, uint32_t perms, absl::Status* error) {
  std::string_view rest = file.substr(offset);
  auto corrupt = [&](std::string_view what) {
    *error = absl::DataLossError(
        absl::StrFormat("index segment %u at byte %u: %s", expected_number, offset, what));
    return SegmentScan::kCorrupt;
  };
  if (rest.size() < kSegmentHeaderSize || AllZero(rest)) return SegmentScan::kTornTail;
  if (!DecodeSegmentHeader(rest, &header_)) return corrupt("bad segment header");
  if (header_.segment_number != expected_number || header_.first_doc != expected_first_doc ||
      header_.flags != 0) {
    return corrupt("segment header out of sequence");
  }
  if (!ComputeLayout(header_, perms, UINT64_MAX - kSegmentHeaderSize - kCommitRecordSize,
                     &layout_)) {
    return corrupt("segment sizes out of range");
  }
  total_bytes_ = kSegmentHeaderSize + layout_.body_length + kCommitRecordSize;
  if (total_bytes_ > rest.size()) return SegmentScan::kTornTail;
  std::string_view commit_bytes =
      rest.substr(kSegmentHeaderSize + layout_.body_length, kCommitRecordSize);
  if (total_bytes_ == rest.size() && AllZero(commit_bytes)) return SegmentScan::kTornTail;
  CommitRecord commit;
  if (!DecodeCommitRecord(commit_bytes, &commit)) return corrupt("bad commit record");
  if (commit.segment_number != expected_number || commit.body_length != layout_.body_length) {
    return corrupt("commit record does not match its segment");
  }
  if (Checksum(rest.substr(0, kSegmentHeaderSize + layout_.tables_end)) != commit.tables_checksum) {
    return corrupt(
        absl::StrFormat("its tables (bytes %u..%u: ids, signatures, band keys) fail their checksum",
                        offset, offset + kSegmentHeaderSize + layout_.tables_end));
  }
  perms_ = perms;
  offset_ = offset;
  Bind(rest.substr(kSegmentHeaderSize, layout_.body_length));
  *error = CheckTables(offset);
  return error->ok() ? SegmentScan::kSegment : SegmentScan::kCorrupt;
}

void SegmentView::Bind(std::string_view body) {
  doc_table_ = body.substr(layout_.doc_table, uint64_t{header_.doc_count} * kDocRecordSize);
  id_order_ = body.data() + layout_.id_order;
  signatures_ = reinterpret_cast<const uint32_t*>(body.data() + layout_.signatures);
  keys_ = reinterpret_cast<const uint64_t*>(body.data() + layout_.band_keys);
  key_docs_ = reinterpret_cast<const uint32_t*>(body.data() + layout_.band_docs);
  retired_ = body.data() + layout_.retired;
  id_bytes_ = body.substr(layout_.id_bytes, header_.id_bytes);
  shingles_ = body.substr(layout_.shingle_bytes, header_.shingle_bytes);
  shingle_padding_ = body.substr(layout_.shingle_bytes + header_.shingle_bytes);
}

std::string_view SegmentView::id(uint32_t local) const {
  DocRecord record = doc(local);
  return id_bytes_.substr(record.id_offset, record.id_length);
}

std::string_view SegmentView::shingle_bytes(uint32_t local) const {
  DocRecord record = doc(local);
  return shingles_.substr(record.shingles_offset, record.shingles_length);
}

absl::Status SegmentView::CheckTables(uint64_t offset) {
  auto bad = [&](std::string_view what) {
    return absl::DataLossError(
        absl::StrFormat("index segment %u at byte %u: %s", header_.segment_number, offset, what));
  };
  absl::Status documents = CheckDocuments(offset);
  if (!documents.ok()) return documents;
  for (uint64_t i = 0; i < header_.key_count; ++i) {
    if (keys_[i] == kNoBandKey || key_docs_[i] >= header_.doc_count ||
        (i > 0 && keys_[i] < keys_[i - 1])) {
      return bad("band-key table out of order");
    }
  }
  for (uint64_t i = 0; i < header_.retired_count; ++i) {
    if (retired(i) >= header_.first_doc || (i > 0 && retired(i) <= retired(i - 1))) {
      return bad("retired list out of order");
    }
  }
  return absl::OkStatus();
}

absl::Status SegmentView::CheckDocuments(uint64_t offset) {
  auto bad = [&](std::string_view what) {
    return absl::DataLossError(
        absl::StrFormat("index segment %u at byte %u: %s", header_.segment_number, offset, what));
  };
  uint64_t id_end = 0, shingle_end = 0;
  for (uint32_t i = 0; i < header_.doc_count; ++i) {
    DocRecord r = doc(i);
    if (r.id_offset != id_end || r.id_length < 1 || r.id_length > kMaxIdLength ||
        r.shingles_offset != shingle_end ||
        uint64_t{r.shingles_length} > uint64_t{r.shingle_count} * 10 ||
        r.shingles_length < r.shingle_count || (r.flags & ~kDocFlagHasPriority) != 0) {
      return bad(absl::StrFormat("document table entry %u is malformed", i));
    }
    id_end += r.id_length;
    shingle_end += r.shingles_length;
  }
  if (id_end != header_.id_bytes || shingle_end != header_.shingle_bytes) {
    return bad("document table does not cover its sections");
  }
  std::vector<bool> seen(header_.doc_count);
  for (uint32_t i = 0; i < header_.doc_count; ++i) {
    uint32_t local = id_order(i);
    if (local >= header_.doc_count || seen[local] || (i > 0 && id(id_order(i - 1)) >= id(local))) {
      return bad("id order table is malformed");
    }
    seen[local] = true;
  }
  return absl::OkStatus();
}

}  // namespace kindred::index
