// Pieces shared by the index writers: locking, whole-file writes by
// temp + sync + rename, segment appends, and the documents of a batch.
#ifndef KINDRED_INDEX_WRITE_UTIL_H_
#define KINDRED_INDEX_WRITE_UTIL_H_

#include <memory>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "index/segment.h"
#include "kindred/file_io.h"
#include "kindred/index.h"
#include "kindred/signed_corpus.h"

namespace kindred::index {

// Takes the writer lock on `path`, retrying when the file was replaced
// (compacted) between opening and locking.
absl::StatusOr<std::unique_ptr<FileLock>> LockIndex(const std::string& path, FileSystem* fs);

// InvalidArgument unless `corpus` can be written under `settings` (perms,
// banding, id lengths).
absl::Status CheckWritable(const IndexSettings& settings, const SignedCorpus& corpus);

SegmentDocument DocumentOf(const SignedCorpus& corpus, size_t doc);
std::vector<SegmentDocument> DocumentsOf(const SignedCorpus& corpus);

// Writes header + segment into a temporary file beside `path`, syncs it,
// renames it to `path` (replacing only when `replace`) and syncs the
// directory. Removes the temporary file on failure when it can.
absl::Status WriteWholeFile(const std::string& path, const std::string& header,
                            const EncodedSegment& segment, bool replace, FileSystem* fs);

// Appends a segment at `committed` (the file's current end): body, sync,
// commit record, sync. On failure cuts the file back to `committed` when it
// can and returns the write error.
absl::Status AppendSegment(AppendFile* file, uint64_t committed, const EncodedSegment& segment);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_WRITE_UTIL_H_
