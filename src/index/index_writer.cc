#include "kindred/index_writer.h"

#include <unistd.h>

#include <algorithm>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "index/commit_area.h"
#include "index/format.h"
#include "index/reserved_commit.h"
#include "index/segment.h"
#include "index/write_util.h"
#include "kindred/errors.h"

namespace kindred {

absl::StatusOr<DuplicateIdPolicy> ParseDuplicateIdPolicy(std::string_view name) {
  if (name == "error") return DuplicateIdPolicy::kError;
  if (name == "skip") return DuplicateIdPolicy::kSkip;
  if (name == "replace") return DuplicateIdPolicy::kReplace;
  return absl::InvalidArgumentError(absl::StrCat("unknown duplicate-id policy \"",
                                                 std::string(name), "\" (error, skip or replace)"));
}

const char* DuplicateIdPolicyName(DuplicateIdPolicy policy) {
  switch (policy) {
    case DuplicateIdPolicy::kError:
      return "error";
    case DuplicateIdPolicy::kSkip:
      return "skip";
    case DuplicateIdPolicy::kReplace:
      return "replace";
  }
  return "error";
}

const char* AddActionName(AddAction action) {
  switch (action) {
    case AddAction::kAdded:
      return "added";
    case AddAction::kSkipped:
      return "skipped";
    case AddAction::kReplaced:
      return "replaced";
  }
  return "added";
}

absl::Status CreateIndex(const std::string& path, const IndexSettings& settings,
                         const SignedCorpus& corpus, const IndexWriteOptions& options) {
  absl::Status valid = index::CheckWritable(settings, corpus);
  if (!valid.ok()) return valid;
  if (options.file_system->Exists(path)) {
    return absl::AlreadyExistsError(absl::StrCat("index ", path, " already exists"));
  }
  std::vector<index::SegmentDocument> docs = index::DocumentsOf(corpus);
  index::EncodedSegment segment = index::EncodeSegment(0, 0, docs, {}, settings);
  return index::WriteWholeFile(path, settings, segment, docs.size(), /*replace=*/false,
                               options.file_system);
}

IndexWriter::~IndexWriter() {
  // The reserve goes with the writer (a reader would ignore it anyway).
  if (options_.reserve_bytes > 0 && file_ != nullptr && !broken_ &&
      file_->size() > reader_->committed_size()) {
    if (file_->Truncate(reader_->committed_size()).ok()) file_->Sync().IgnoreError();
  }
}

absl::StatusOr<std::unique_ptr<IndexWriter>> IndexWriter::Open(const std::string& path,
                                                               const IndexWriteOptions& options) {
  std::unique_ptr<IndexWriter> writer(new IndexWriter());
  writer->path_ = path;
  writer->options_ = options;
  auto lock = index::LockIndex(path, options.file_system, options.lock_wait_seconds);
  if (!lock.ok()) return lock.status();
  writer->lock_ = *std::move(lock);
  auto reader = IndexReader::Open(path, IndexOpenOptions{options.file_system});
  if (!reader.ok()) return reader.status();
  writer->reader_ = *std::move(reader);
  if (writer->reader_->format_version() == 1) {
    return SettingsMismatch(absl::StrFormat(
        "index %s is format version 1, which does not record its commits, so a writer cannot "
        "tell a torn tail from lost data; run `kindred compact %s` once to rewrite it as "
        "version 2, then add to it",
        path, path));
  }
  // Nothing is appended to a file with damaged committed data.
  if (absl::Status sound = writer->reader_->VerifyShingleChecksums(); !sound.ok()) {
    return absl::DataLossError(
        absl::StrCat(sound.message(), "; nothing was written (see kindred audit --repair)"));
  }
  auto file = options.file_system->OpenAppend(path);
  if (!file.ok()) return file.status();
  writer->file_ = *std::move(file);
  const IndexReader& opened = *writer->reader_;
  uint64_t committed = opened.committed_size();
  if (writer->file_->size() != committed) {
    // Zeros a writer reserved are cut without being reported as torn.
    writer->torn_tail_cut_ = opened.torn_tail_bytes();
    absl::Status cut = writer->file_->Truncate(committed);
    if (cut.ok()) cut = writer->file_->Sync();
    if (!cut.ok()) return cut;
  }
  // A slot that does not verify is rewritten with what the file holds
  // (including segments written before an interrupted commit).
  if (opened.damaged_commit_slots() > 0) {
    absl::Status recorded = index::RecordCommit(
        writer->file_.get(), index::CommitState{opened.commit_generation() + 1, committed,
                                                static_cast<uint32_t>(opened.segments().size()),
                                                opened.document_count()});
    if (!recorded.ok()) return recorded;
    if (absl::Status read = writer->reader_->ReadAppended(IndexOpenOptions{options.file_system});
        !read.ok()) {
      return read;
    }
  }
  return writer;
}

absl::StatusOr<AppendResult> IndexWriter::Append(const SignedCorpus& batch,
                                                 DuplicateIdPolicy policy) {
  if (broken_) {
    return absl::FailedPreconditionError("an earlier append to this index failed; reopen it");
  }
  const IndexSettings& settings = reader_->settings();
  absl::Status valid = index::CheckWritable(settings, batch);
  if (!valid.ok()) return valid;
  AppendResult result;
  std::vector<index::SegmentDocument> docs;
  std::vector<uint64_t> retired;
  uint32_t next = reader_->document_count();
  for (size_t i = 0; i < batch.size(); ++i) {
    std::optional<uint32_t> existing = reader_->FindLive(batch.id(i));
    if (existing && policy == DuplicateIdPolicy::kError) {
      return absl::InvalidArgumentError(
          absl::StrCat("document id \"", batch.id(i), "\" is already in the index ", path_));
    }
    if (existing && policy == DuplicateIdPolicy::kSkip) {
      result.actions.push_back(AddAction::kSkipped);
      result.index_numbers.push_back(*existing);
      ++result.skipped;
      continue;
    }
    if (existing) retired.push_back(*existing);
    result.actions.push_back(existing ? AddAction::kReplaced : AddAction::kAdded);
    result.index_numbers.push_back(next + static_cast<uint32_t>(docs.size()));
    ++(existing ? result.replaced : result.added);
    docs.push_back(index::DocumentOf(batch, i));
  }
  if (docs.empty() && retired.empty()) return result;
  if (uint64_t{next} + docs.size() > index::kMaxDocuments) {
    return LimitExceeded("the index would exceed 2^31 documents");
  }
  std::sort(retired.begin(), retired.end());
  if (absl::Status written = WriteSegment(docs, retired, &result.segment_number); !written.ok()) {
    return written;
  }
  result.wrote_segment = true;
  return result;
}

absl::Status IndexWriter::WriteSegment(absl::Span<const index::SegmentDocument> docs,
                                       absl::Span<const uint64_t> retired,
                                       uint32_t* segment_number) {
  if (broken_) {
    return absl::FailedPreconditionError("an earlier append to this index failed; reopen it");
  }
  *segment_number = static_cast<uint32_t>(reader_->segments().size());
  index::EncodedSegment segment = index::EncodeSegment(*segment_number, reader_->document_count(),
                                                       docs, retired, reader_->settings());
  const index::CommitPoint before{reader_->commit_generation(), reader_->committed_size(),
                                  static_cast<uint32_t>(reader_->segments().size()),
                                  reader_->document_count()};
  absl::Status written = options_.reserve_bytes > 0
                             ? index::CommitIntoReserve(file_.get(), before, docs.size(), segment,
                                                        options_.reserve_bytes)
                             : index::AppendSegment(file_.get(), before, docs.size(), segment);
  if (!written.ok()) {
    broken_ = true;
    return written;
  }
  // Reads back and verifies the new segment only (re-opening the whole
  // index after every segment made building in parts quadratic).
  return reader_->ReadAppended(IndexOpenOptions{options_.file_system});
}

absl::StatusOr<RetireResult> IndexWriter::Retire(absl::Span<const std::string> ids) {
  std::vector<uint64_t> retired;
  std::vector<std::string_view> missing;
  for (const std::string& id : ids) {
    std::optional<uint32_t> doc = reader_->FindLive(id);
    if (doc) {
      retired.push_back(*doc);
    } else {
      missing.push_back(id);
    }
  }
  std::sort(retired.begin(), retired.end());
  retired.erase(std::unique(retired.begin(), retired.end()), retired.end());
  std::sort(missing.begin(), missing.end());
  missing.erase(std::unique(missing.begin(), missing.end()), missing.end());
  if (!missing.empty()) {
    std::string list;
    for (size_t i = 0; i < missing.size() && i < 10; ++i) {
      absl::StrAppend(&list, i == 0 ? "\"" : ", \"", std::string(missing[i]), "\"");
    }
    if (missing.size() > 10) absl::StrAppend(&list, " and ", missing.size() - 10, " more");
    return absl::NotFoundError(
        absl::StrFormat("%u %s not live in the index %s: %s; nothing was retired", missing.size(),
                        missing.size() == 1 ? "id is" : "ids are", path_, list));
  }
  RetireResult result;
  if (retired.empty()) return result;
  if (absl::Status written = WriteSegment({}, retired, &result.segment_number); !written.ok()) {
    return written;
  }
  result.wrote_segment = true;
  result.retired = static_cast<uint32_t>(retired.size());
  return result;
}

}  // namespace kindred
