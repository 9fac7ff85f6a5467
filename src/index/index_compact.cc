// Compaction: the live documents rewritten as one segment, atomically, and
// streamed: the new file is written section by section straight from the
// mapped old one (ids, signatures and encoded shingle sets are copied, not
// decoded), so memory does not grow with the shingle sets. What does grow
// with the index: the band-key table, sorted under CompactOptions::memory
// (key_sorter.h), and 4 bytes a live document for the id order.
#include <xxhash.h>

#include <algorithm>
#include <cstring>
#include <vector>

#include "absl/strings/str_format.h"
#include "index/codec.h"
#include "index/commit_area.h"
#include "index/format.h"
#include "index/key_sorter.h"
#include "index/key_table.h"
#include "index/segment.h"
#include "index/write_util.h"
#include "io/atomic_file.h"
#include "kindred/banding.h"
#include "kindred/index_writer.h"

namespace kindred {
namespace {

// Appends to a file through a buffer, hashing what it writes while asked to.
class StreamWriter {
 public:
  explicit StreamWriter(io::AtomicFile* file) : file_(file), state_(XXH3_createState()) {
    XXH3_64bits_reset(state_);
  }
  ~StreamWriter() { XXH3_freeState(state_); }
  StreamWriter(const StreamWriter&) = delete;
  StreamWriter& operator=(const StreamWriter&) = delete;

  void Write(std::string_view bytes) {
    if (hashing_) XXH3_64bits_update(state_, bytes.data(), bytes.size());
    written_ += bytes.size();
    buffer_.append(bytes);
    if (buffer_.size() >= kFlushBytes) Flush();
  }
  void U32(uint32_t v) {
    char bytes[4];
    index::StoreU32(bytes, v);
    Write(std::string_view(bytes, 4));
  }
  void U64(uint64_t v) {
    char bytes[8];
    index::StoreU64(bytes, v);
    Write(std::string_view(bytes, 8));
  }
  // Zero bytes up to the next multiple of 8 from `start`.
  void PadFrom(uint64_t start) {
    static constexpr char kZero[8] = {};
    Write(std::string_view(kZero, index::RoundUp8(written_ - start) - (written_ - start)));
  }
  void StartHash() { hashing_ = true; }
  uint64_t StopHash() {
    hashing_ = false;
    return XXH3_64bits_digest(state_);
  }
  uint64_t written() const { return written_; }
  void Flush() {
    if (status_.ok() && !buffer_.empty()) status_ = file_->Append(buffer_);
    buffer_.clear();
  }
  const absl::Status& status() const { return status_; }

 private:
  static constexpr size_t kFlushBytes = size_t{1} << 20;
  io::AtomicFile* file_;
  XXH3_state_t* state_;
  bool hashing_ = false;
  uint64_t written_ = 0;
  std::string buffer_;
  absl::Status status_;
};

// The live documents of the old file, and what the new segment holds.
struct Plan {
  std::vector<uint32_t> live;  // old numbers, ascending (new number = index)
  index::SegmentHeader header;
  index::SectionLayout layout;
};

// Counts the sections of the new segment, verifies every live shingle set
// and sorts the band keys of the new banding into *keys.
absl::Status Survey(const IndexReader& reader, const IndexSettings& settings, Plan* plan,
                    index::KeySorter* keys) {
  const index::KeyPlan key_plan = index::StoredKeyPlan(settings);
  std::vector<uint64_t> band_keys;
  std::vector<uint64_t> shingles;
  index::SegmentHeader& h = plan->header;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    if (!reader.is_live(doc)) continue;
    uint64_t checksum;
    const std::string_view set = reader.StoredShingles(doc, &checksum);
    if (index::Checksum(set) != checksum) {
      return reader.ReadShingles(doc, &shingles);  // the DataLoss naming the document
    }
    const uint32_t number = static_cast<uint32_t>(plan->live.size());
    plan->live.push_back(doc);
    h.id_bytes += reader.id(doc).size();
    h.shingle_bytes += set.size();
    index::DocumentKeys(key_plan, reader.signature(doc), reader.shingle_count(doc), &band_keys);
    for (uint64_t key : band_keys) {
      if (absl::Status added = keys->Add(key, number); !added.ok()) return added;
    }
  }
  if (absl::Status sorted = keys->Finish(); !sorted.ok()) return sorted;
  h.doc_count = static_cast<uint32_t>(plan->live.size());
  h.key_count = keys->size();
  index::ComputeLayout(h, settings.signature.perms, UINT64_MAX, &plan->layout);
  return absl::OkStatus();
}

// The document table (FORMAT.md, "doc_table") of the new segment.
void WriteDocTable(const IndexReader& reader, const Plan& plan, StreamWriter* out) {
  uint64_t id_offset = 0, shingles_offset = 0;
  char record[index::kDocRecordSize];
  for (uint32_t doc : plan.live) {
    index::DocRecord r;
    const std::string_view set = reader.StoredShingles(doc, &r.shingles_checksum);
    const KeepFacts facts = reader.facts(doc);
    r.id_offset = id_offset;
    r.shingles_offset = shingles_offset;
    r.text_length = facts.length;
    r.priority = facts.priority;
    r.id_length = static_cast<uint32_t>(reader.id(doc).size());
    r.shingle_count = reader.shingle_count(doc);
    r.shingles_length = static_cast<uint32_t>(set.size());
    r.flags = facts.has_priority ? index::kDocFlagHasPriority : 0;
    index::StoreDocRecord(r, record);
    out->Write(std::string_view(record, sizeof record));
    id_offset += r.id_length;
    shingles_offset += set.size();
  }
}

// The new numbers of the live documents sorted by id ("id_order").
void WriteIdOrder(const IndexReader& reader, const Plan& plan, StreamWriter* out) {
  std::vector<uint32_t> order(plan.live.size());
  for (uint32_t i = 0; i < order.size(); ++i) order[i] = i;
  std::sort(order.begin(), order.end(), [&](uint32_t a, uint32_t b) {
    return reader.id(plan.live[a]) < reader.id(plan.live[b]);
  });
  for (uint32_t number : order) out->U32(number);
}

// Segment 0 of the new file: header, body sections, commit record.
absl::Status WriteSegment(const IndexReader& reader, const Plan& plan, const index::KeySorter& keys,
                          StreamWriter* out) {
  out->StartHash();
  std::string head;
  index::EncodeSegmentHeader(plan.header, &head);
  out->Write(head);
  const uint64_t body = out->written();
  WriteDocTable(reader, plan, out);
  out->PadFrom(body);
  WriteIdOrder(reader, plan, out);
  out->PadFrom(body);
  for (uint32_t doc : plan.live) {
    for (uint32_t slot : reader.signature(doc)) out->U32(slot);
  }
  out->PadFrom(body);
  absl::Status merged = keys.ForEach([&](const BucketEntry& e) { out->U64(e.key); });
  out->PadFrom(body);
  if (merged.ok()) merged = keys.ForEach([&](const BucketEntry& e) { out->U32(e.doc); });
  if (!merged.ok()) return merged;
  out->PadFrom(body);  // an empty retired list
  for (uint32_t doc : plan.live) out->Write(reader.id(doc));
  out->PadFrom(body);
  const uint64_t tables_checksum = out->StopHash();
  uint64_t checksum;
  for (uint32_t doc : plan.live) out->Write(reader.StoredShingles(doc, &checksum));
  out->PadFrom(body);
  if (out->written() - body != plan.layout.body_length) {
    return absl::InternalError(
        absl::StrFormat("compact wrote a segment body of %u bytes, %u were laid out",
                        out->written() - body, plan.layout.body_length));
  }
  std::string commit;
  index::EncodeCommitRecord(index::CommitRecord{0, plan.layout.body_length, tables_checksum},
                            &commit);
  out->Write(commit);
  return absl::OkStatus();
}

// Writes the new file beside `path` and renames it into place, through
// the one atomic-write helper (io/atomic_file.h).
absl::Status WriteCompacted(const std::string& path, const IndexReader& reader,
                            const IndexSettings& settings, const Plan& plan,
                            const index::KeySorter& keys, FileSystem* fs) {
  auto file = io::AtomicFile::Create(path, fs);
  if (!file.ok()) return file.status();
  const uint64_t length = index::kDataStart + index::kSegmentHeaderSize + plan.layout.body_length +
                          index::kCommitRecordSize;
  absl::Status status;
  {
    StreamWriter out(file->get());
    out.Write(index::EncodeHeaderRegion(index::EncodeFileHeader(settings),
                                        index::CommitState{1, length, 1, plan.live.size()}));
    status = WriteSegment(reader, plan, keys, &out);
    out.Flush();
    if (status.ok()) status = out.status();
  }
  if (!status.ok()) return status;  // the temporary file is removed with `file`
  return (*file)->Commit();
}

// The directory of `path`, for scratch files.
std::string DirectoryOf(const std::string& path) {
  const size_t slash = path.rfind('/');
  if (slash == std::string::npos) return ".";
  return slash == 0 ? "/" : path.substr(0, slash);
}

}  // namespace

absl::StatusOr<CompactResult> CompactIndex(const std::string& path, const CompactOptions& compact,
                                           const IndexWriteOptions& options) {
  FileSystem* fs = options.file_system;
  if ((compact.bands == 0) != (compact.rows == 0)) {
    return absl::InvalidArgumentError("give both bands and rows, or neither");
  }
  auto lock = index::LockIndex(path, fs, options.lock_wait_seconds);
  if (!lock.ok()) return lock.status();
  auto reader = IndexReader::Open(path, IndexOpenOptions{fs});
  if (!reader.ok()) return reader.status();
  if ((*reader)->format_version() == 1 && (*reader)->torn_tail_bytes() > 0) {
    return absl::FailedPreconditionError(absl::StrFormat(
        "index %s is format version 1 and has %u bytes after its last whole segment at byte %u, "
        "which version 1 cannot tell from a cut-off committed segment; nothing was written. "
        "`kindred audit --repair %s` writes the readable documents to a version-2 copy beside it",
        path, (*reader)->torn_tail_bytes(), (*reader)->committed_size(), path));
  }
  IndexSettings settings = (*reader)->settings();
  if (compact.bands != 0) {
    settings.bands = compact.bands;
    settings.rows = compact.rows;
  }
  // An index made for containment before version 3 (or built without its
  // keys) is upgraded: it gets the containment keys of its threshold.
  if (settings.measure == Measure::kContainment && !settings.containment.stored()) {
    settings.containment = ContainmentKeysFor(settings.threshold, kDefaultMinContainedSize);
  }
  if (uint64_t{settings.bands} * settings.rows > settings.signature.perms) {
    return absl::InvalidArgumentError("index banding does not fit the signature length");
  }
  constexpr uint64_t kLeastBudget = uint64_t{4} << 20;
  index::KeySorter keys(compact.memory == 0 ? 0 : std::max(compact.memory, kLeastBudget),
                        compact.scratch_dir.empty() ? DirectoryOf(path) : compact.scratch_dir, fs);
  Plan plan;
  if (absl::Status surveyed = Survey(**reader, settings, &plan, &keys); !surveyed.ok()) {
    return surveyed;
  }
  CompactResult result;
  result.segments_before = static_cast<uint32_t>((*reader)->segments().size());
  result.documents_before = (*reader)->document_count();
  result.documents_after = static_cast<uint32_t>(plan.live.size());
  result.bytes_before = (*reader)->file_size();
  result.bytes_after = index::kDataStart + index::kSegmentHeaderSize + plan.layout.body_length +
                       index::kCommitRecordSize;
  result.scratch_runs = keys.runs();
  if (absl::Status written = WriteCompacted(path, **reader, settings, plan, keys, fs);
      !written.ok()) {
    return written;
  }
  return result;
}

}  // namespace kindred
