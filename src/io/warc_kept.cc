// CopyKeptRecords: the second pass over a WARC input for --write-kept.
#include "io/warc_kept.h"

#include <vector>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "io/warc_documents.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

absl::StatusOr<std::unique_ptr<WarcDocuments>> Open(const std::string& path,
                                                    const InputOptions& options) {
  DecodeOptions decode;
  decode.max_decompressed_bytes = options.max_decompressed_bytes;
  decode.file_system = options.file_system;
  auto stream = OpenDecoded(path, decode);
  if (!stream.ok()) return stream.status();
  return std::make_unique<WarcDocuments>(std::move(*stream), DisplayName(path), options, nullptr);
}

// The record ids this record names as related.
std::vector<std::string> Related(const WarcHeader& header) {
  std::vector<std::string> ids;
  for (const auto& [name, value] : header.fields) {
    if (absl::EqualsIgnoreCase(name, "WARC-Concurrent-To") ||
        absl::EqualsIgnoreCase(name, "WARC-Refers-To")) {
      ids.push_back(value);
    }
  }
  return ids;
}

// The first pass: the decision for every document, and the ids of the
// dropped documents and of the records they name.
struct Drops {
  std::vector<bool> kept_docs;
  absl::flat_hash_set<std::string> dropped, named_by_dropped;
};

absl::Status FindDrops(const std::string& path, const InputOptions& options, uint64_t first_ordinal,
                       const std::function<bool(uint64_t ordinal)>& keep, Drops* drops) {
  auto records = Open(path, options);
  if (!records.ok()) return records.status();
  WarcRecord record;
  for (;;) {
    absl::StatusOr<bool> more = (*records)->Next(&record);
    if (!more.ok()) return more.status();
    if (!*more) return absl::OkStatus();
    if (!record.role.document) continue;
    const bool kept = keep(first_ordinal + drops->kept_docs.size());
    drops->kept_docs.push_back(kept);
    if (kept) continue;
    drops->dropped.insert(std::string(record.header.Field("WARC-Record-ID")));
    for (std::string& id : Related(record.header)) drops->named_by_dropped.insert(std::move(id));
  }
}

// Whether a record that is not a document is written: warcinfo always,
// others unless linked to a dropped document.
bool KeepsOther(const Drops& drops, const WarcHeader& header) {
  if (absl::EqualsIgnoreCase(header.Field("WARC-Type"), "warcinfo")) return true;
  if (drops.named_by_dropped.contains(header.Field("WARC-Record-ID"))) return false;
  for (const std::string& id : Related(header)) {
    if (drops.dropped.contains(id)) return false;
  }
  return true;
}

// Writes a whole record as it was read, as one member of the output.
absl::Status WriteRecord(const WarcRecord& record, OutputFile* out, WarcKeptCounts* counts) {
  for (absl::string_view part :
       {absl::string_view(record.header.raw), absl::string_view(record.block),
        absl::string_view(record.trailer)}) {
    if (absl::Status s = out->Append(part); !s.ok()) return s;
  }
  if (absl::Status s = out->EndMember(); !s.ok()) return s;
  ++counts->records;
  return absl::OkStatus();
}

}  // namespace

absl::Status CopyKeptRecords(const std::string& path, const InputOptions& options,
                             uint64_t first_ordinal,
                             const std::function<bool(uint64_t ordinal)>& keep, OutputFile* out,
                             WarcKeptCounts* counts) {
  Drops drops;
  if (absl::Status found = FindDrops(path, options, first_ordinal, keep, &drops); !found.ok()) {
    return found;
  }
  const std::vector<bool>& kept_docs = drops.kept_docs;
  auto records = Open(path, options);
  if (!records.ok()) return records.status();
  WarcRecord record;
  size_t doc = 0;
  for (;;) {
    // A block too large to hold (never a document) is written as it streams
    // by, after its header.
    bool started = false, writing = false;
    std::function<absl::Status(absl::string_view)> streamed =
        [&](absl::string_view bytes) -> absl::Status {
      if (!started) {
        started = true;
        writing = KeepsOther(drops, record.header);
        if (writing) {
          if (absl::Status s = out->Append(record.header.raw); !s.ok()) return s;
        }
      }
      return writing ? out->Append(bytes) : absl::OkStatus();
    };
    absl::StatusOr<bool> more = (*records)->Next(&record, streamed);
    if (!more.ok()) return more.status();
    if (!*more) break;
    bool write;
    if (record.role.document) {
      if (doc >= kept_docs.size()) {
        return InputChanged(absl::StrCat(path, ": changed while being read"));
      }
      write = kept_docs[doc++];
      ++counts->documents;
      if (write) ++counts->kept;
    } else if (!record.whole) {
      if (writing) {
        if (absl::Status s = out->Append(record.trailer); !s.ok()) return s;
        if (absl::Status s = out->EndMember(); !s.ok()) return s;
        ++counts->records;
      }
      continue;
    } else {
      write = KeepsOther(drops, record.header);
    }
    if (!write) continue;
    if (absl::Status s = WriteRecord(record, out, counts); !s.ok()) return s;
  }
  return absl::OkStatus();
}

}  // namespace kindred::io
