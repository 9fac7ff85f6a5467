// Compaction: the live documents rewritten as one segment, atomically.
#include <vector>

#include "absl/strings/str_format.h"
#include "index/commit_area.h"
#include "index/format.h"
#include "index/segment.h"
#include "index/write_util.h"
#include "kindred/index_writer.h"

namespace kindred {
namespace {

// The live documents of `reader`, decoded (shingle sets verified).
absl::Status LoadLiveDocuments(const IndexReader& reader, SignedCorpus* out) {
  std::vector<uint64_t> shingles;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    if (!reader.is_live(doc)) continue;
    absl::Status read = reader.ReadShingles(doc, &shingles);
    if (!read.ok()) return read;
    out->Add(std::string(reader.id(doc)), reader.facts(doc), DocumentOrigin{}, shingles,
             reader.signature(doc));
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<CompactResult> CompactIndex(const std::string& path, const CompactOptions& compact,
                                           const IndexWriteOptions& options) {
  FileSystem* fs = options.file_system;
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
  if ((compact.bands == 0) != (compact.rows == 0)) {
    return absl::InvalidArgumentError("give both bands and rows, or neither");
  }
  if (compact.bands != 0) {
    settings.bands = compact.bands;
    settings.rows = compact.rows;
  }
  SignedCorpus live(settings.signature.perms);
  absl::Status loaded = LoadLiveDocuments(**reader, &live);
  if (!loaded.ok()) return loaded;
  absl::Status valid = index::CheckWritable(settings, live);
  if (!valid.ok()) return valid;
  index::EncodedSegment segment =
      index::EncodeSegment(0, 0, index::DocumentsOf(live), {}, settings);
  CompactResult result;
  result.segments_before = static_cast<uint32_t>((*reader)->segments().size());
  result.documents_before = (*reader)->document_count();
  result.documents_after = static_cast<uint32_t>(live.size());
  result.bytes_before = (*reader)->file_size();
  result.bytes_after = index::kDataStart + segment.head_and_body.size() + segment.commit.size();
  absl::Status written =
      index::WriteWholeFile(path, settings, segment, live.size(), /*replace=*/true, fs);
  if (!written.ok()) return written;
  return result;
}

}  // namespace kindred
