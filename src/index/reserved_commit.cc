#include "index/reserved_commit.h"

#include <algorithm>
#include <string>

#include "index/commit_area.h"

namespace kindred::index {
namespace {

// Appends zeros up to `size` bytes of file, a mebibyte at a time.
absl::Status ExtendWithZeros(AppendFile* file, uint64_t size) {
  static const std::string kZeros(1 << 20, '\0');
  while (file->size() < size) {
    const uint64_t piece = std::min<uint64_t>(kZeros.size(), size - file->size());
    if (absl::Status status = file->Append(std::string_view(kZeros).substr(0, piece));
        !status.ok()) {
      return status;
    }
  }
  return absl::OkStatus();
}

}  // namespace

absl::Status CommitIntoReserve(AppendFile* file, const CommitPoint& before, uint64_t added,
                               const EncodedSegment& segment, uint64_t reserve_bytes) {
  const uint64_t length = segment.head_and_body.size() + segment.commit.size();
  const CommitState next{before.generation + 1, before.committed_length + length,
                         before.segments + 1, before.documents + added};
  absl::Status status;
  if (file->size() < next.committed_length) {
    status = ExtendWithZeros(file, next.committed_length + reserve_bytes);
    if (status.ok()) status = file->Sync();
  }
  if (status.ok()) status = file->WriteAt(before.committed_length, segment.head_and_body);
  if (status.ok()) {
    status = file->WriteAt(before.committed_length + segment.head_and_body.size(), segment.commit);
  }
  return FinishCommit(file, before, next, status);
}

}  // namespace kindred::index
