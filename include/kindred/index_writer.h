// kindred: creating, appending to, compacting, auditing and repairing an
// index file (`.kin`). The byte layout is in src/index/FORMAT.md.
//
// Durability: CreateIndex and CompactIndex write a temporary file beside the
// index, sync it, rename it into place and sync the directory, so a crash
// leaves either no new file (or the old file intact) or the complete new one.
// IndexWriter::Append writes a segment and its commit record, syncs, then
// records the new committed length in the file's commit area and syncs
// again before it returns OK: a crash at any point leaves every earlier
// committed document readable, and at most a torn tail (bytes after the
// recorded commit) that readers ignore and the next writer cuts off. No
// writer ever cuts bytes the file records as committed.
//
// One writer at a time: IndexWriter::Open, CompactIndex and RepairIndex take
// an exclusive advisory lock on the file (flock) and fail with Unavailable
// when another writer holds it, at once or after lock_wait_seconds. Readers
// need no lock.
//
// Thread-safety: an IndexWriter is used by one thread; the free functions
// may run concurrently on different files.
#ifndef KINDRED_INDEX_WRITER_H_
#define KINDRED_INDEX_WRITER_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/file_io.h"
#include "kindred/index.h"
#include "kindred/signed_corpus.h"

namespace kindred {
namespace index {
struct SegmentDocument;
}  // namespace index

// What Append does with a document whose id is already live in the index.
enum class DuplicateIdPolicy : uint8_t {
  kError = 0,    // refuse the whole batch (InvalidArgument naming the id)
  kSkip = 1,     // leave the indexed document; do not add the new one
  kReplace = 2,  // add the new one and retire the indexed one
};

// Parses "error", "skip", "replace".
absl::StatusOr<DuplicateIdPolicy> ParseDuplicateIdPolicy(std::string_view name);
const char* DuplicateIdPolicyName(DuplicateIdPolicy policy);

struct IndexWriteOptions {
  FileSystem* file_system = DefaultFileSystem();  // borrowed
  // How long a writer waits for the lock another writer holds, retrying
  // every 50 ms, before it fails with Unavailable (0: fail at once).
  double lock_wait_seconds = 0;
  // With reserve_bytes > 0 (a long-lived writer, such as `kindred serve`),
  // the writer keeps zero bytes, written and synced, past the committed end
  // (at least this many after each extension) and writes each segment over
  // them: the sync of a segment then writes data only, not the file's size
  // and block map (see FORMAT.md, "Reserved space"). Destroying the writer
  // cuts the reserve off again.
  uint64_t reserve_bytes = 0;
};

// Creates a new index at `path` holding `corpus` (which may be empty) as
// segment 0. Requires settings.signature.perms == corpus.perms(), a valid
// banding (bands * rows <= perms) and ids of 1..65535 bytes. Fails with
// AlreadyExists when `path` exists (never replaces a file).
absl::Status CreateIndex(const std::string& path, const IndexSettings& settings,
                         const SignedCorpus& corpus, const IndexWriteOptions& options = {});

// What Append did with each document of a batch.
enum class AddAction : uint8_t { kAdded, kSkipped, kReplaced };
const char* AddActionName(AddAction action);

struct RetireResult {
  bool wrote_segment = false;  // false when nothing was retired
  uint32_t segment_number = 0;
  uint32_t retired = 0;  // live documents retired
};

struct AppendResult {
  bool wrote_segment = false;  // false when nothing was added or retired
  uint32_t segment_number = 0;
  uint32_t added = 0, skipped = 0, replaced = 0;
  std::vector<AddAction> actions;       // per batch document
  std::vector<uint32_t> index_numbers;  // per batch document: its global number
                                        // when added, the indexed one when skipped
};

class IndexWriter {
 public:
  // Locks `path` and opens it for appending; cuts off a torn tail (synced)
  // before anything else. Errors: Unavailable (another writer), the reader's
  // errors (DataLoss, FailedPrecondition, NotFound), write errors.
  static absl::StatusOr<std::unique_ptr<IndexWriter>> Open(const std::string& path,
                                                           const IndexWriteOptions& options = {});
  ~IndexWriter();

  // The committed index as of Open() or the last successful Append() (the
  // reader catches up with each appended segment; what it returned before
  // stays valid).
  const IndexReader& reader() const { return *reader_; }
  // Bytes of torn tail that Open() cut off.
  uint64_t torn_tail_cut() const { return torn_tail_cut_; }

  // Appends the documents of `batch` as one new segment, applying `policy`
  // to ids already live in the index; returns after the segment is durable.
  // Requires batch.perms() == settings().signature.perms and ids unique
  // within the batch. Write errors: ResourceExhausted (disk full) or Aborted;
  // the partial segment is cut off when possible, and in every case the
  // index keeps all earlier committed documents. After a failed Append the
  // writer refuses further appends (FailedPrecondition): open a new one.
  absl::StatusOr<AppendResult> Append(const SignedCorpus& batch, DuplicateIdPolicy policy);

  // Retires the live documents with these ids in one new segment that holds
  // no documents, only the retired list (FORMAT.md, "retired"); durable like
  // Append. All or nothing: NotFound naming the ids (up to ten) that are not
  // live, and nothing is written. Repeated ids count once.
  absl::StatusOr<RetireResult> Retire(absl::Span<const std::string> ids);

 private:
  IndexWriter() = default;
  // Encodes and commits one segment of `docs` retiring `retired` (sorted);
  // on success the reader has caught up with it.
  absl::Status WriteSegment(absl::Span<const index::SegmentDocument> docs,
                            absl::Span<const uint64_t> retired, uint32_t* segment_number);

  std::string path_;
  IndexWriteOptions options_;
  std::unique_ptr<FileLock> lock_;
  std::unique_ptr<AppendFile> file_;
  std::unique_ptr<IndexReader> reader_;
  uint64_t torn_tail_cut_ = 0;
  bool broken_ = false;  // an Append failed part-way
};

struct CompactOptions {
  // New banding of the stored band-key tables; 0 keeps the current one.
  uint32_t bands = 0;
  uint32_t rows = 0;
  // Memory budget in bytes for sorting the band-key table (0: none, the
  // whole table is sorted in memory, 32 bytes an entry at the peak). With a
  // budget (at least 4 MB is used), sorted runs go to an unlinked scratch
  // file in `scratch_dir` (empty: the index's directory). The new file is
  // the same bytes either way.
  uint64_t memory = 0;
  std::string scratch_dir = "";
};

struct CompactResult {
  uint32_t segments_before = 0;
  uint32_t documents_before = 0;  // including retired ones
  uint32_t documents_after = 0;   // the live documents, renumbered in order
  uint64_t bytes_before = 0;
  uint64_t bytes_after = 0;
  size_t scratch_runs = 0;  // sorted runs of band keys written to scratch
};

// Rewrites the index as one segment of its live documents (in their order),
// atomically: a crash leaves the old file intact. Takes the writer lock.
// Streams: ids, signatures and shingle sets are copied from the mapped file
// (every set's checksum verified first), so memory is the band-key sort
// (see `memory`) plus 4 bytes a live document. A version-1 file is
// rewritten in the current version; a file whose default measure is
// containment but that stores no containment keys (made before format
// version 3) gets them, for its threshold and kDefaultMinContainedSize
// (version 3).
absl::StatusOr<CompactResult> CompactIndex(const std::string& path,
                                           const CompactOptions& compact = {},
                                           const IndexWriteOptions& options = {});

struct AuditReport {
  // What is wrong, one sentence each, naming segment, document and byte
  // offset. Empty when the index is sound.
  std::vector<std::string> problems;
  // Facts worth knowing that are not damage (a torn tail that readers ignore).
  std::vector<std::string> notes;
  uint32_t segments = 0;
  uint32_t documents = 0;
  uint64_t torn_tail_bytes = 0;
  bool ok() const { return problems.empty(); }
};

// Verifies every checksum and structural invariant: the header and each
// segment's tables (as on open), every shingle set (checksum and encoding),
// every signature against a re-signing of its shingle set, every band key
// against the signatures, zero padding, and unique live ids. Returns the
// report; a status error only when the file cannot be read at all
// (NotFound, PermissionDenied, ...).
absl::StatusOr<AuditReport> AuditIndex(const std::string& path,
                                       const IndexWriteOptions& options = {});

struct RepairResult {
  // Bytes after the recorded commit of a sound version-2 file, cut off.
  uint64_t torn_tail_cut = 0;
  // Set when the file is damaged (or is a version-1 file with bytes after
  // its last whole segment): a version-2 copy holding every readable live
  // document was written here ("INDEX.repaired.kin"); the file itself is
  // left exactly as it was.
  std::string repaired_path;
  uint32_t documents_kept = 0;
  // What the copy lacks, one sentence each (segments, document numbers and
  // ids when known, byte ranges).
  std::vector<std::string> lost;
};

// Under the writer lock: cuts off a torn tail of a sound version-2 file
// (synced); for a damaged file writes the repaired copy beside it. Never
// deletes or cuts committed bytes. AlreadyExists when the copy's path is
// taken; FailedPrecondition for a newer format; DataLoss when not even the
// file header can be read.
absl::StatusOr<RepairResult> RepairIndex(const std::string& path,
                                         const IndexWriteOptions& options = {});

}  // namespace kindred

#endif  // KINDRED_INDEX_WRITER_H_
