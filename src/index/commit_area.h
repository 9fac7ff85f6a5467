// The commit area of a version-2 index file (FORMAT.md, "Commit area"):
// two checksummed slots in the header region that record what the file has
// committed (its committed length, segment and document counts), written
// alternately so that an interrupted update leaves the other slot whole.
//
// Everything that knows where the slots are, how they are encoded and in
// which order a writer updates them lives here. Pure functions, except
// RecordCommit, which writes through an AppendFile.
#ifndef KINDRED_INDEX_COMMIT_AREA_H_
#define KINDRED_INDEX_COMMIT_AREA_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "kindred/file_io.h"

namespace kindred::index {

inline constexpr std::string_view kSlotMagic{"KCAS", 4};  // frozen
// Each slot is one whole 512-byte sector, checksummed to its end; the file
// header (512 bytes in version 2, checksum included) is the sector before.
inline constexpr size_t kCommitSlotSize = 512;
inline constexpr uint64_t kCommitSlotOffset[2] = {512, 1024};
inline constexpr uint64_t kHeaderSizeV2 = 512;
// Where the first segment of a version-2 file starts.
inline constexpr uint64_t kDataStart = 1536;

// What one slot records.
struct CommitState {
  uint64_t generation = 0;        // 1 for a new file, +1 per commit
  uint64_t committed_length = 0;  // end of the last committed segment
  uint32_t segment_count = 0;
  uint64_t document_count = 0;

  friend bool operator==(const CommitState&, const CommitState&) = default;
};

// The slot that holds generation `generation` (odd: 0, even: 1).
inline int SlotOf(uint64_t generation) { return generation % 2 == 1 ? 0 : 1; }

std::string EncodeCommitSlot(const CommitState& state);

enum class SlotStatus { kEmpty, kValid, kDamaged };
// `bytes` holds kCommitSlotSize bytes. kEmpty when all are zero.
SlotStatus DecodeCommitSlot(std::string_view bytes, CommitState* state);

// What a reader found in the commit area.
struct CommitArea {
  CommitState current;  // the valid slot with the highest generation
  SlotStatus slots[2] = {SlotStatus::kEmpty, SlotStatus::kEmpty};
};

// Reads both slots of `file` (the mapped file; header already verified).
// DataLoss when the file is shorter than the header region, when no slot is
// valid, or when the chosen slot is out of range.
absl::Status ReadCommitArea(std::string_view file, CommitArea* area);

// The whole header region of a new version-2 file: `file_header`, zero
// padding, `state` in its slot, the other slot empty (all zero).
std::string EncodeHeaderRegion(std::string_view file_header, const CommitState& state);

// Writes `next` (whose generation is one more than the current one) into
// its slot, the older of the two, and syncs. Call only after the segments
// it covers are written and synced.
absl::Status RecordCommit(AppendFile* file, const CommitState& next);

// After a failed RecordCommit: empties the slot `failed` was written to, so
// that the other slot (the previous state) is the current one again.
absl::Status UndoCommit(AppendFile* file, const CommitState& failed);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_COMMIT_AREA_H_
