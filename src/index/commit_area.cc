#include "index/commit_area.h"

#include <algorithm>

#include "absl/strings/str_format.h"
#include "index/codec.h"

namespace kindred::index {

std::string EncodeCommitSlot(const CommitState& state) {
  std::string out;
  ByteWriter writer(&out);
  writer.Bytes(kSlotMagic);
  writer.U32(state.segment_count);
  writer.U64(state.generation);
  writer.U64(state.committed_length);
  writer.U64(state.document_count);
  out.resize(kCommitSlotSize - 8, '\0');
  writer.U64(Checksum(out));
  return out;
}

SlotStatus DecodeCommitSlot(std::string_view bytes, CommitState* state) {
  bytes = bytes.substr(0, kCommitSlotSize);
  if (std::all_of(bytes.begin(), bytes.end(), [](char c) { return c == 0; })) {
    return SlotStatus::kEmpty;
  }
  if (bytes.size() < kCommitSlotSize || bytes.substr(0, 4) != kSlotMagic ||
      Checksum(bytes.substr(0, kCommitSlotSize - 8)) !=
          LoadU64(bytes.data() + kCommitSlotSize - 8)) {
    return SlotStatus::kDamaged;
  }
  state->segment_count = LoadU32(bytes.data() + 4);
  state->generation = LoadU64(bytes.data() + 8);
  state->committed_length = LoadU64(bytes.data() + 16);
  state->document_count = LoadU64(bytes.data() + 24);
  return SlotStatus::kValid;
}

absl::Status ReadCommitArea(std::string_view file, CommitArea* area) {
  if (file.size() < kDataStart) {
    return absl::DataLossError(absl::StrFormat(
        "the file is %u bytes, shorter than its %u-byte header region", file.size(), kDataStart));
  }
  CommitArea found;
  bool any = false;
  for (int slot = 0; slot < 2; ++slot) {
    CommitState state;
    found.slots[slot] = DecodeCommitSlot(file.substr(kCommitSlotOffset[slot]), &state);
    if (found.slots[slot] != SlotStatus::kValid) continue;
    if (state.generation == 0 || SlotOf(state.generation) != slot) {
      found.slots[slot] = SlotStatus::kDamaged;
      continue;
    }
    if (!any || state.generation > found.current.generation) found.current = state;
    any = true;
  }
  if (!any) {
    return absl::DataLossError(
        absl::StrFormat("the commit area (bytes %u..%u) is damaged: no commit slot verifies",
                        kCommitSlotOffset[0], kCommitSlotOffset[1] + kCommitSlotSize));
  }
  if (found.current.committed_length < kDataStart || found.current.committed_length % 8 != 0) {
    return absl::DataLossError(absl::StrFormat("the commit area records a bad committed length %u",
                                               found.current.committed_length));
  }
  *area = found;
  return absl::OkStatus();
}

std::string EncodeHeaderRegion(std::string_view file_header, const CommitState& state) {
  std::string out(kDataStart, '\0');
  out.replace(0, file_header.size(), file_header);
  out.replace(kCommitSlotOffset[SlotOf(state.generation)], kCommitSlotSize,
              EncodeCommitSlot(state));
  return out;
}

absl::Status RecordCommit(AppendFile* file, const CommitState& next) {
  absl::Status status =
      file->WriteAt(kCommitSlotOffset[SlotOf(next.generation)], EncodeCommitSlot(next));
  if (status.ok()) status = file->Sync();
  return status;
}

absl::Status UndoCommit(AppendFile* file, const CommitState& failed) {
  absl::Status status = file->WriteAt(kCommitSlotOffset[SlotOf(failed.generation)],
                                      std::string(kCommitSlotSize, '\0'));
  if (status.ok()) status = file->Sync();
  return status;
}

}  // namespace kindred::index
