// Audit: every checksum and structural invariant of an index file.
#include <algorithm>
#include <string>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_format.h"
#include "index/format.h"
#include "index/key_table.h"
#include "index/segment.h"
#include "kindred/banding.h"
#include "kindred/index_writer.h"
#include "kindred/signer.h"

namespace kindred {
namespace {

// Padding after each segment's shingle sets must be zero (the only bytes no
// checksum covers).
void CheckPadding(std::string_view file, const IndexReader& reader, AuditReport* report) {
  for (const SegmentInfo& info : reader.segments()) {
    index::SegmentView view;
    absl::Status error;
    if (view.Parse(file, info.offset, info.number, info.first_doc,
                   reader.settings().signature.perms, &error) != index::SegmentScan::kSegment) {
      report->problems.push_back(std::string(error.message()));
      continue;
    }
    std::string_view padding = view.shingle_padding();
    if (std::any_of(padding.begin(), padding.end(), [](char c) { return c != 0; })) {
      report->problems.push_back(
          absl::StrFormat("index segment %u at byte %u: nonzero padding after the shingle sets",
                          info.number, info.offset));
    }
  }
}

// Each document's shingle set decodes and re-signs to its stored signature.
void CheckDocuments(const IndexReader& reader, AuditReport* report) {
  Signer signer(reader.settings().signature);
  std::vector<uint64_t> shingles;
  std::vector<uint32_t> signature(signer.perms());
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    absl::Status read = reader.ReadShingles(doc, &shingles);
    if (!read.ok()) {
      report->problems.push_back(std::string(read.message()));
      continue;
    }
    signer.Sign(shingles, absl::MakeSpan(signature));
    auto stored = reader.signature(doc);
    if (!std::equal(signature.begin(), signature.end(), stored.begin(), stored.end())) {
      report->problems.push_back(
          absl::StrFormat("document %u (\"%s\"): stored signature does not match its shingle set",
                          doc, reader.id(doc)));
    }
  }
}

// The stored band-key tables hold exactly the keys of the live documents'
// signatures (retired documents' keys are skipped by the reader, so both
// sides are compared over live documents).
void CheckBandKeys(const IndexReader& reader, AuditReport* report) {
  index::KeyTable stored;
  reader.ForEachBandKey([&](uint64_t key, uint32_t doc) { stored.emplace_back(key, doc); });
  std::sort(stored.begin(), stored.end());
  const index::KeyTable expected = index::BuildKeyTable(
      index::StoredKeyPlan(reader.settings()), 0, reader.document_count(), [&](uint32_t doc) {
        return index::KeyedDocument{reader.signature(doc), reader.shingle_count(doc),
                                    !reader.is_live(doc)};
      });
  if (stored != expected) {
    report->problems.push_back("the band-key tables do not match the stored signatures");
  }
}

void CheckUniqueIds(const IndexReader& reader, AuditReport* report) {
  absl::flat_hash_map<std::string_view, uint32_t> seen;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    if (!reader.is_live(doc)) continue;
    auto [it, inserted] = seen.emplace(reader.id(doc), doc);
    if (!inserted) {
      report->problems.push_back(absl::StrFormat("documents %u and %u are both live with id \"%s\"",
                                                 it->second, doc, reader.id(doc)));
    }
  }
}

}  // namespace

absl::StatusOr<AuditReport> AuditIndex(const std::string& path, const IndexWriteOptions& options) {
  AuditReport report;
  auto mapping = options.file_system->Map(path);
  if (!mapping.ok()) return mapping.status();
  auto reader = IndexReader::Open(path, IndexOpenOptions{options.file_system});
  if (!reader.ok()) {
    if (!absl::IsDataLoss(reader.status()) && !absl::IsFailedPrecondition(reader.status())) {
      return reader.status();
    }
    report.problems.push_back(std::string(reader.status().message()));
    return report;
  }
  const IndexReader& r = **reader;
  report.segments = static_cast<uint32_t>(r.segments().size());
  report.documents = r.document_count();
  report.torn_tail_bytes = r.torn_tail_bytes();
  if (r.format_version() == 1) {
    report.notes.push_back(
        "format version 1: the file does not record its commits (kindred compact rewrites it as "
        "version 2; add refuses to write to it until then)");
  }
  if (report.torn_tail_bytes > 0 && r.format_version() == 1) {
    report.notes.push_back(absl::StrFormat(
        "%u bytes at byte %u after the last whole segment: an interrupted write or a cut-off "
        "segment (version 1 cannot tell which); readers ignore them; audit --repair writes the "
        "readable documents to a version-2 copy",
        report.torn_tail_bytes, r.committed_size()));
  } else if (report.torn_tail_bytes > 0) {
    report.notes.push_back(absl::StrFormat(
        "torn tail: %u bytes at byte %u after the last recorded commit (an interrupted write; "
        "readers ignore it; the next writer or audit --repair cuts it off)",
        report.torn_tail_bytes, r.committed_size()));
  }
  if (r.damaged_commit_slots() > 0) {
    report.notes.push_back(absl::StrFormat(
        "one commit slot does not verify (an interrupted commit); the other records generation %u",
        r.commit_generation()));
  }
  // The file may have grown since it was mapped; only committed bytes matter.
  std::string_view file = (*mapping)->bytes().substr(0, r.committed_size());
  CheckPadding(file, r, &report);
  CheckDocuments(r, &report);
  CheckBandKeys(r, &report);
  CheckUniqueIds(r, &report);
  return report;
}

}  // namespace kindred
