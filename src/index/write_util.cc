#include "index/write_util.h"

#include <unistd.h>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/time/clock.h"
#include "absl/time/time.h"
#include "index/format.h"
#include "io/atomic_file.h"
#include "kindred/errors.h"
#include "kindred/temp_files.h"

namespace kindred::index {

absl::StatusOr<std::unique_ptr<FileLock>> LockIndex(const std::string& path, FileSystem* fs,
                                                    double wait_seconds) {
  const absl::Time deadline = absl::Now() + absl::Seconds(wait_seconds);
  for (int attempt = 0; attempt < 5;) {
    auto lock = fs->LockExclusive(path);
    if (absl::IsUnavailable(lock.status()) && wait_seconds > 0) {
      if (absl::Now() >= deadline) {
        return IndexBusy(absl::StrFormat("%s (still, after waiting %g s for it)",
                                         lock.status().message(), wait_seconds));
      }
      absl::SleepFor(absl::Milliseconds(50));
      continue;
    }
    if (!lock.ok()) return lock.status();
    if (fs->LockStillNamesPath(**lock, path)) return lock;
    ++attempt;
  }
  return IndexBusy(
      absl::StrCat("index ", path, " keeps being replaced by another writer; try again later"));
}

absl::Status CheckWritable(const IndexSettings& settings, const SignedCorpus& corpus) {
  if (corpus.perms() != settings.signature.perms) {
    return absl::InvalidArgumentError(
        absl::StrFormat("signatures of %u slots cannot go into an index of %u-slot signatures",
                        corpus.perms(), settings.signature.perms));
  }
  if (settings.bands < 1 || settings.rows < 1 ||
      uint64_t{settings.bands} * settings.rows > settings.signature.perms) {
    return absl::InvalidArgumentError("index banding does not fit the signature length");
  }
  if (settings.unicode_version.size() > kMaxUnicodeVersionLength) {
    return absl::InvalidArgumentError("Unicode version text is too long");
  }
  for (const std::string& id : corpus.ids()) {
    if (id.empty() || id.size() > kMaxIdLength) {
      return absl::InvalidArgumentError(absl::StrFormat(
          "document id of %u bytes cannot be indexed (1..%u bytes)", id.size(), kMaxIdLength));
    }
  }
  return absl::OkStatus();
}

SegmentDocument DocumentOf(const SignedCorpus& corpus, size_t doc) {
  return SegmentDocument{corpus.id(doc), corpus.facts(doc), corpus.shingles(doc),
                         corpus.signature(doc)};
}

std::vector<SegmentDocument> DocumentsOf(const SignedCorpus& corpus) {
  std::vector<SegmentDocument> docs;
  docs.reserve(corpus.size());
  for (size_t i = 0; i < corpus.size(); ++i) docs.push_back(DocumentOf(corpus, i));
  return docs;
}

absl::Status WriteWholeFile(const std::string& path, const IndexSettings& settings,
                            const EncodedSegment& segment, uint64_t documents, bool replace,
                            FileSystem* fs) {
  auto file = io::AtomicFile::Create(path, fs, replace);
  if (!file.ok()) return file.status();
  const uint64_t length = kDataStart + segment.head_and_body.size() + segment.commit.size();
  absl::Status status = (*file)->Append(
      EncodeHeaderRegion(EncodeFileHeader(settings), CommitState{1, length, 1, documents}));
  if (status.ok()) status = (*file)->Append(segment.head_and_body);
  if (status.ok()) status = (*file)->Append(segment.commit);
  if (status.ok()) status = (*file)->Commit();
  return status;
}

absl::Status AppendSegment(AppendFile* file, const CommitPoint& before, uint64_t added,
                           const EncodedSegment& segment) {
  const CommitState next{
      before.generation + 1,
      before.committed_length + segment.head_and_body.size() + segment.commit.size(),
      before.segments + 1, before.documents + added};
  absl::Status status = file->Append(segment.head_and_body);
  if (status.ok()) status = file->Append(segment.commit);
  return FinishCommit(file, before, next, status);
}

absl::Status FinishCommit(AppendFile* file, const CommitPoint& before, const CommitState& next,
                          absl::Status written) {
  absl::Status status = written;
  if (status.ok()) status = file->Sync();
  bool slot_written = false;
  if (status.ok()) {
    slot_written = true;
    status = RecordCommit(file, next);
  }
  if (status.ok()) return status;
  // Nothing of the failed commit may stay recorded before the bytes go.
  if (slot_written && !UndoCommit(file, next).ok()) return status;
  if (file->Truncate(before.committed_length).ok()) file->Sync().IgnoreError();
  return status;
}

}  // namespace kindred::index
