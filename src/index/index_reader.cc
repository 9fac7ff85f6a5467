#include <algorithm>
#include <cstring>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "index/codec.h"
#include "index/commit_area.h"
#include "index/containment_lookup.h"
#include "index/format.h"
#include "index/reader_segment.h"
#include "index/tail_tables.h"
#include "kindred/banding.h"
#include "kindred/errors.h"
#include "kindred/index.h"

namespace kindred {

IndexReader::~IndexReader() = default;

absl::StatusOr<std::unique_ptr<IndexReader>> IndexReader::Open(const std::string& path,
                                                               const IndexOpenOptions& options) {
  absl::Status status;
  // A writer may commit between the mapping and the reading of the commit
  // area (the record then names bytes past the mapped end): a file whose
  // size changed meanwhile is mapped and read again.
  for (int attempt = 0; attempt < 4; ++attempt) {
    auto mapping = options.file_system->Map(path);
    if (!mapping.ok()) return mapping.status();
    std::unique_ptr<IndexReader> reader(new IndexReader());
    reader->path_ = path;
    reader->mapping_ = *std::move(mapping);
    reader->file_ = reader->mapping_->bytes();
    reader->containment_lookups_ = std::make_unique<index::ContainmentLookupCache>();
    status = reader->Load();
    if (status.ok()) {
      reader->reserved_bytes_ = reader->CountReservedBytes();
      // The small segments at the end (those group commits write) go to
      // the tail tables; larger ones are looked up one by one, but for a
      // reader of many queries at most kDirectSegments of them (the first):
      // a file of many mid-sized segments (built under --memory, or grown
      // by many adds) would otherwise cost a search per segment and band
      // key. The tables cost memory (16 bytes per band key) and time at
      // open that a compacted file does not.
      constexpr uint32_t kTailSegmentDocuments = 64;
      constexpr size_t kDirectSegments = 8;
      size_t from = reader->segment_views_.size();
      while (from > 0 && reader->segment_views_[from - 1].doc_count() < kTailSegmentDocuments) {
        --from;
      }
      reader->tail_from_ = options.many_queries ? std::min(from, kDirectSegments) : from;
      reader->ExtendTail(reader->tail_from_);
      return reader;
    }
    if (!absl::IsDataLoss(status)) break;
    auto again = options.file_system->Map(path);
    if (!again.ok() || (*again)->bytes().size() == reader->file_.size()) break;
  }
  return Annotate(status, absl::StrCat("index ", path));
}

absl::Status IndexReader::Load() {
  size_t header_size = 0;
  absl::Status status = index::DecodeFileHeader(file_, &settings_, &header_size, &format_version_);
  if (!status.ok()) return status;
  bands_ = settings_.bands;
  rows_ = settings_.rows;
  if (format_version_ == 1) {
    committed_size_ = header_size;
    return LoadSegments(file_.size(), /*recorded=*/false);
  }
  committed_size_ = index::kDataStart;
  return LoadCommitted();
}

absl::Status IndexReader::LoadCommitted() {
  index::CommitArea area;
  absl::Status status = index::ReadCommitArea(file_, &area);
  if (!status.ok()) return status;
  const index::CommitState& state = area.current;
  if (file_.size() < state.committed_length) {
    return absl::DataLossError(absl::StrFormat(
        "the file is %u bytes but records %u committed bytes (%u %s, %u %s): bytes %u..%u of "
        "committed data are missing",
        file_.size(), state.committed_length, state.segment_count,
        state.segment_count == 1 ? "segment" : "segments", state.document_count,
        state.document_count == 1 ? "document" : "documents", file_.size(),
        state.committed_length));
  }
  if (state.generation < commit_generation_) {
    return absl::DataLossError("the commit area went backwards");
  }
  if (state.committed_length >= committed_size_) {
    status = LoadSegments(state.committed_length, /*recorded=*/true);
    if (!status.ok()) return status;
    if (segments_.size() != state.segment_count || document_count_ != state.document_count) {
      return absl::DataLossError(absl::StrFormat(
          "the commit area records %u segments and %u documents, the committed bytes hold %u "
          "segments and %u documents",
          state.segment_count, state.document_count, segments_.size(), document_count_));
    }
  }
  commit_generation_ = state.generation;
  damaged_commit_slots_ = (area.slots[0] == index::SlotStatus::kDamaged) +
                          (area.slots[1] == index::SlotStatus::kDamaged);
  // A slot that does not verify may be a commit interrupted after its
  // segments were written and synced (or a damaged newer record): whole,
  // verified segments after the recorded length are read as in version 1,
  // and the next writer records them.
  if (damaged_commit_slots_ > 0) return LoadSegments(file_.size(), /*recorded=*/false);
  return absl::OkStatus();
}

absl::Status IndexReader::LoadSegments(uint64_t end, bool recorded) {
  // Parsed into these first, so that an error changes nothing.
  std::vector<SegmentInfo> infos;
  std::vector<Segment> views;
  std::vector<bool> retired = retired_;
  uint32_t retiring = 0;
  absl::Status status;
  uint64_t offset = committed_size_;
  uint64_t first_doc = document_count_;
  const std::string_view file = file_.substr(0, end);
  while (offset < end) {
    Segment segment;
    const uint32_t number = static_cast<uint32_t>(segments_.size() + infos.size());
    index::SegmentScan scan =
        segment.Parse(file, offset, number, first_doc, settings_.signature.perms, &status);
    if (scan == index::SegmentScan::kTornTail && recorded) {
      return absl::DataLossError(absl::StrFormat(
          "committed segment %u at bytes %u..%u does not verify (the file records %u committed "
          "bytes; the segment is cut short or zeroed)",
          number, offset, end, end));
    }
    if (scan == index::SegmentScan::kTornTail) break;
    if (scan == index::SegmentScan::kCorrupt) return status;
    const index::SegmentHeader& h = segment.header();
    if (first_doc + h.doc_count > index::kMaxDocuments) {
      return absl::DataLossError(absl::StrFormat("index segment %u: too many documents", number));
    }
    retired.resize(first_doc + h.doc_count, false);
    for (uint64_t i = 0; i < h.retired_count; ++i) {
      const uint64_t doc = segment.retired(i);
      if (retired[doc]) {
        return absl::DataLossError(
            absl::StrFormat("index segment %u: document %u is retired twice", number, doc));
      }
      retired[doc] = true;
      ++retiring;
    }
    infos.push_back(SegmentInfo{number, offset, segment.total_bytes(),
                                static_cast<uint32_t>(first_doc), h.doc_count, h.retired_count,
                                h.key_count, h.shingle_bytes});
    views.push_back(segment);
    offset += segment.total_bytes();
    first_doc += h.doc_count;
  }
  for (size_t i = 0; i < infos.size(); ++i) {
    segments_.push_back(infos[i]);
    segment_first_doc_.push_back(infos[i].first_doc);
    segment_views_.push_back(views[i]);
  }
  live_count_ += static_cast<uint32_t>(first_doc - document_count_) - retiring;
  retired_ = std::move(retired);
  committed_size_ = offset;
  document_count_ = static_cast<uint32_t>(first_doc);
  return absl::OkStatus();
}

absl::Status IndexReader::ReadAppended(const IndexOpenOptions& options) {
  auto mapping = options.file_system->Map(path_);
  if (!mapping.ok()) return mapping.status();
  const size_t segments_before = segment_views_.size();
  if ((*mapping)->bytes().size() == file_.size() && format_version_ == 2) {
    // The same size: the current (shared) mapping shows what was written
    // since, and no mapping piles up per commit.
    mapping->reset();
    absl::Status status = LoadCommitted();
    if (!status.ok()) {
      return Annotate(status, absl::StrCat("index ", path_));
    }
    // What was reserved and is still past the commit is zeros yet.
    reserved_bytes_ = std::min(reserved_bytes_, file_.size() - committed_size_);
    ExtendTail(segments_before);
    return memory_keys_.empty() ? absl::OkStatus() : UseBanding(bands_, rows_);
  }
  std::unique_ptr<MappedFile> previous = std::move(mapping_);
  const std::string_view previous_file = file_;
  mapping_ = *std::move(mapping);
  file_ = mapping_->bytes();
  absl::Status status;
  if (file_.size() < committed_size_) {
    status = absl::DataLossError("the file is shorter than its committed part");
  } else if (format_version_ == 1) {
    status = LoadSegments(file_.size(), /*recorded=*/false);
  } else {
    status = LoadCommitted();
  }
  if (!status.ok()) {
    mapping_ = std::move(previous);
    file_ = previous_file;
    return Annotate(status, absl::StrCat("index ", path_));
  }
  earlier_mappings_.push_back(std::move(previous));
  reserved_bytes_ = CountReservedBytes();
  ExtendTail(segments_before);
  // A query-time banding covers the new documents too.
  return memory_keys_.empty() ? absl::OkStatus() : UseBanding(bands_, rows_);
}

uint64_t IndexReader::CountReservedBytes() const {
  if (format_version_ == 1) return 0;
  // Whole 4 KiB blocks from the end first, then the bytes of the last one
  // that is not all zero.
  static constexpr char kZeros[4096] = {};
  uint64_t end = file_.size();
  while (end - committed_size_ >= sizeof(kZeros) &&
         std::memcmp(file_.data() + end - sizeof(kZeros), kZeros, sizeof(kZeros)) == 0) {
    end -= sizeof(kZeros);
  }
  while (end > committed_size_ && file_[end - 1] == 0) --end;
  return file_.size() - end;
}

const IndexReader::Segment& IndexReader::SegmentOf(uint32_t doc, uint32_t* local) const {
  auto it = std::upper_bound(segment_first_doc_.begin(), segment_first_doc_.end(), doc);
  size_t s = static_cast<size_t>(it - segment_first_doc_.begin()) - 1;
  *local = doc - segment_first_doc_[s];
  return segment_views_[s];
}

std::string_view IndexReader::id(uint32_t doc) const {
  uint32_t local;
  return SegmentOf(doc, &local).id(local);
}

KeepFacts IndexReader::facts(uint32_t doc) const {
  uint32_t local;
  index::DocRecord record = SegmentOf(doc, &local).doc(local);
  return KeepFacts{record.text_length, record.priority,
                   (record.flags & index::kDocFlagHasPriority) != 0};
}

absl::Span<const uint32_t> IndexReader::signature(uint32_t doc) const {
  uint32_t local;
  return SegmentOf(doc, &local).signature(local);
}

uint32_t IndexReader::shingle_count(uint32_t doc) const {
  uint32_t local;
  return SegmentOf(doc, &local).doc(local).shingle_count;
}

absl::Status IndexReader::ShingleError(uint32_t doc) const {
  uint32_t local;
  const Segment& segment = SegmentOf(doc, &local);
  const uint64_t at = segment.shingle_offset(local);
  return absl::DataLossError(absl::StrFormat(
      "index %s: document \"%s\" (number %u): shingle set does not verify: bytes %u..%u of "
      "segment %u are damaged",
      path_, segment.id(local), doc, at, at + segment.doc(local).shingles_length,
      segment.header().segment_number));
}

absl::Status IndexReader::ReadShingles(uint32_t doc, std::vector<uint64_t>* out) const {
  uint32_t local;
  const Segment& segment = SegmentOf(doc, &local);
  index::DocRecord record = segment.doc(local);
  std::string_view bytes = segment.shingle_bytes(local);
  out->clear();
  if (index::Checksum(bytes) != record.shingles_checksum ||
      !index::DecodeShingleSet(bytes, record.shingle_count, out)) {
    out->clear();
    return ShingleError(doc);
  }
  return absl::OkStatus();
}

std::string_view IndexReader::StoredShingles(uint32_t doc, uint64_t* checksum) const {
  uint32_t local;
  const Segment& segment = SegmentOf(doc, &local);
  *checksum = segment.doc(local).shingles_checksum;
  return segment.shingle_bytes(local);
}

absl::Status IndexReader::VerifyShingleChecksums() const {
  for (uint32_t doc = 0; doc < document_count_; ++doc) {
    uint32_t local;
    const Segment& segment = SegmentOf(doc, &local);
    if (index::Checksum(segment.shingle_bytes(local)) != segment.doc(local).shingles_checksum) {
      return ShingleError(doc);
    }
  }
  return absl::OkStatus();
}

void IndexReader::ExtendTail(size_t from) {
  if (tail_ == nullptr) tail_ = std::make_unique<index::TailTables>();
  for (size_t s = std::max(from, tail_from_); s < segment_views_.size(); ++s) {
    tail_->Add(segment_views_[s], segment_first_doc_[s]);
  }
}

std::optional<uint32_t> IndexReader::FindLive(std::string_view id) const {
  // The newest document with the id is in the tail when the tail holds the
  // id at all; only when that one is retired may an older one be live.
  size_t scan_from = segment_views_.size();
  if (tail_ != nullptr) {
    const std::optional<uint32_t> newest = tail_->Newest(id);
    if (newest.has_value() && is_live(*newest)) return newest;
    if (!newest.has_value()) scan_from = tail_from_;
  }
  for (size_t s = scan_from; s-- > 0;) {
    const Segment& segment = segment_views_[s];
    uint32_t lo = 0, hi = segment.doc_count();
    while (lo < hi) {
      uint32_t mid = lo + (hi - lo) / 2;
      if (segment.id(segment.id_order(mid)) < id) {
        lo = mid + 1;
      } else {
        hi = mid;
      }
    }
    if (lo < segment.doc_count() && segment.id(segment.id_order(lo)) == id) {
      uint32_t doc = segment_first_doc_[s] + segment.id_order(lo);
      if (is_live(doc)) return doc;
    }
  }
  return std::nullopt;
}

absl::Status CheckIndexSettings(const IndexSettings& stored, const SignatureSettings& wanted,
                                std::string_view current_unicode_version,
                                std::vector<std::string>* warnings) {
  if (stored.signature != wanted) {
    return SettingsMismatch(absl::StrCat("the index was made with other settings: index has ",
                                         stored.signature.ToString(), ", this command asks for ",
                                         wanted.ToString()));
  }
  if (stored.unicode_version != current_unicode_version) {
    warnings->push_back(absl::StrCat(
        "the index was made with ", stored.unicode_version, " and this program uses ",
        std::string(current_unicode_version),
        ": normalization and word boundaries of characters changed between the two versions "
        "may differ, so such documents may shingle differently"));
  }
  return absl::OkStatus();
}

}  // namespace kindred
