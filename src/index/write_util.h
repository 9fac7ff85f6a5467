// Pieces shared by the index writers: locking, whole-file writes by
// temp + sync + rename, segment appends, and the documents of a batch.
#ifndef KINDRED_INDEX_WRITE_UTIL_H_
#define KINDRED_INDEX_WRITE_UTIL_H_

#include <memory>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "index/commit_area.h"
#include "index/segment.h"
#include "kindred/file_io.h"
#include "kindred/index.h"
#include "kindred/signed_corpus.h"

namespace kindred::index {

// Takes the writer lock on `path`, retrying when the file was replaced
// (compacted) between opening and locking; while another writer holds it,
// retries every 50 ms for up to `wait_seconds`, then fails with Unavailable.
absl::StatusOr<std::unique_ptr<FileLock>> LockIndex(const std::string& path, FileSystem* fs,
                                                    double wait_seconds = 0);

// InvalidArgument unless `corpus` can be written under `settings` (perms,
// banding, id lengths).
absl::Status CheckWritable(const IndexSettings& settings, const SignedCorpus& corpus);

SegmentDocument DocumentOf(const SignedCorpus& corpus, size_t doc);
std::vector<SegmentDocument> DocumentsOf(const SignedCorpus& corpus);

// Writes a version-2 file of one segment (segment 0, holding `documents`
// documents) whole or not at all through an io::AtomicFile: a temporary
// file beside `path` ("PATH.tmp.PID", removed on SIGINT/SIGTERM), synced,
// renamed to `path` (replacing only when `replace`), the directory synced.
// Removes the temporary file on failure when it can.
absl::Status WriteWholeFile(const std::string& path, const IndexSettings& settings,
                            const EncodedSegment& segment, uint64_t documents, bool replace,
                            FileSystem* fs);

// What a version-2 file records after its commit `generation`.
struct CommitPoint {
  uint64_t generation = 0;
  uint64_t committed_length = 0;
  uint32_t segments = 0;
  uint64_t documents = 0;
};

// Appends a segment at `before.committed_length` (the file's current end)
// and commits it: header and body, commit record, sync; then the commit
// area records the new length, segment and document counts (`added`
// documents more), synced. On failure restores the commit area and cuts
// the file back to what `before` records when it can, and returns the
// write error.
absl::Status AppendSegment(AppendFile* file, const CommitPoint& before, uint64_t added,
                           const EncodedSegment& segment);

// The end of every segment commit, once its bytes are `written` (an error
// skips to the undo): sync, then record `next` in the commit area; on
// failure restores the commit area and cuts the file back to `before` when
// it can, and returns the first error.
absl::Status FinishCommit(AppendFile* file, const CommitPoint& before, const CommitState& next,
                          absl::Status written);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_WRITE_UTIL_H_
