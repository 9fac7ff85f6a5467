// Commits into reserved space (FORMAT.md, "Reserved space"): a long-lived
// writer keeps zero bytes, written and synced, past the committed end of a
// version-2 file and writes each segment over them. The sync that makes the
// segment durable then writes data blocks only: the file's size and block
// map are already on disk, so the file system has no metadata to journal.
// The commit protocol is unchanged: segment, sync, commit slot, sync.
#ifndef KINDRED_INDEX_RESERVED_COMMIT_H_
#define KINDRED_INDEX_RESERVED_COMMIT_H_

#include <cstdint>

#include "absl/status/status.h"
#include "index/segment.h"
#include "index/write_util.h"
#include "kindred/file_io.h"

namespace kindred::index {

// Like AppendSegment, but writes the segment at `before.committed_length`
// over zero bytes past it. When fewer than the segment's bytes remain, the
// file is first extended with zeros to the segment's end plus
// `reserve_bytes` and synced. Requires every byte of `file` past
// before.committed_length to be zero. On failure restores the commit area
// and cuts the file back to before.committed_length (dropping the reserve)
// when it can, and returns the write error.
absl::Status CommitIntoReserve(AppendFile* file, const CommitPoint& before, uint64_t added,
                               const EncodedSegment& segment, uint64_t reserve_bytes);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_RESERVED_COMMIT_H_
