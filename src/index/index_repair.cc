// audit --repair: cut a torn tail of a sound file, or write a repaired copy
// of a damaged one beside it. Committed bytes are never cut or deleted.
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "index/index_salvage.h"
#include "index/segment.h"
#include "index/write_util.h"
#include "kindred/errors.h"
#include "kindred/index_writer.h"

namespace kindred {
namespace {

// "x.kin" -> "x.repaired.kin"; other names get ".repaired.kin" appended.
std::string RepairedPath(const std::string& path) {
  const std::string_view suffix = ".kin";
  if (path.size() > suffix.size() && path.ends_with(suffix)) {
    return absl::StrCat(path.substr(0, path.size() - suffix.size()), ".repaired.kin");
  }
  return absl::StrCat(path, ".repaired.kin");
}

absl::StatusOr<RepairResult> WriteRepairedCopy(const std::string& path, FileSystem* fs) {
  auto mapping = fs->Map(path);
  if (!mapping.ok()) return mapping.status();
  index::Salvage salvage;
  absl::Status salvaged = index::SalvageIndex((*mapping)->bytes(), &salvage);
  if (!salvaged.ok()) {
    return Annotate(salvaged, absl::StrCat("index ", path));
  }
  RepairResult result;
  result.repaired_path = RepairedPath(path);
  result.documents_kept = static_cast<uint32_t>(salvage.live.size());
  result.lost = std::move(salvage.lost);
  index::EncodedSegment segment =
      index::EncodeSegment(0, 0, index::DocumentsOf(salvage.live), {}, salvage.settings);
  absl::Status written = index::WriteWholeFile(result.repaired_path, salvage.settings, segment,
                                               salvage.live.size(), /*replace=*/false, fs);
  if (absl::IsAlreadyExists(written)) {
    return absl::AlreadyExistsError(
        absl::StrFormat("%s already exists (an earlier repair?); move it away to repair again",
                        result.repaired_path));
  }
  if (!written.ok()) return written;
  return result;
}

}  // namespace

absl::StatusOr<RepairResult> RepairIndex(const std::string& path,
                                         const IndexWriteOptions& options) {
  FileSystem* fs = options.file_system;
  auto lock = index::LockIndex(path, fs, options.lock_wait_seconds);
  if (!lock.ok()) return lock.status();
  auto reader = IndexReader::Open(path, IndexOpenOptions{fs});
  if (!reader.ok() && !absl::IsDataLoss(reader.status())) return reader.status();
  const bool sound = reader.ok() && (*reader)->VerifyShingleChecksums().ok();
  if (!sound || ((*reader)->format_version() == 1 && (*reader)->torn_tail_bytes() > 0)) {
    return WriteRepairedCopy(path, fs);
  }
  RepairResult result;
  const uint64_t committed = (*reader)->committed_size();
  if ((*reader)->torn_tail_bytes() == 0) return result;
  auto file = fs->OpenAppend(path);
  if (!file.ok()) return file.status();
  absl::Status cut = (*file)->Truncate(committed);
  if (cut.ok()) cut = (*file)->Sync();
  if (!cut.ok()) return cut;
  result.torn_tail_cut = (*reader)->torn_tail_bytes();
  return result;
}

}  // namespace kindred
