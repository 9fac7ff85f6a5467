#include "index/index_salvage.h"

#include <algorithm>

#include "absl/container/flat_hash_map.h"
#include "absl/container/flat_hash_set.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "index/codec.h"
#include "index/commit_area.h"
#include "index/format.h"
#include "index/segment.h"
#include "kindred/errors.h"

namespace kindred::index {
namespace {

// A range of lost document numbers as text ("documents 4..5092").
std::string DocumentRange(uint64_t first, uint64_t end) {
  if (end <= first) return "no documents";
  if (end == first + 1) return absl::StrFormat("document %u", first);
  return absl::StrFormat("documents %u..%u", first, end - 1);
}

// The scan over a file: readable segments and the gaps between them.
struct Scan {
  std::vector<SegmentView> segments;
  std::vector<std::string> lost;
  uint32_t next_number = 0;  // segments seen (readable or not)
  uint64_t next_doc = 0;     // documents seen
  uint64_t gap_start = 0;    // first byte not accounted for
};

// Records the segments (and their documents) between what the scan has
// seen and a segment `number` with first document `first_doc` at `offset`.
void NoteGap(Scan* scan, uint32_t number, uint64_t first_doc, uint64_t offset) {
  if (number <= scan->next_number) return;
  scan->lost.push_back(
      absl::StrFormat("segment%s %u%s at bytes %u..%u do%s not verify: %s lost (ids unknown)",
                      number - scan->next_number > 1 ? "s" : "", scan->next_number,
                      number - scan->next_number > 1 ? absl::StrFormat("..%u", number - 1) : "",
                      scan->gap_start, offset, number - scan->next_number > 1 ? "" : "es",
                      DocumentRange(scan->next_doc, first_doc)));
}

void ScanSegments(std::string_view file, uint64_t start, uint32_t perms, Scan* scan) {
  scan->gap_start = start;
  uint64_t offset = start;
  while (offset + kSegmentHeaderSize <= file.size()) {
    SegmentHeader h;
    if (!DecodeSegmentHeader(file.substr(offset), &h) || h.segment_number < scan->next_number ||
        h.first_doc < scan->next_doc) {
      offset += 8;
      continue;
    }
    NoteGap(scan, h.segment_number, h.first_doc, offset);
    SegmentView view;
    absl::Status error;
    if (view.Parse(file, offset, h.segment_number, h.first_doc, perms, &error) ==
        SegmentScan::kSegment) {
      scan->segments.push_back(view);
      offset += view.total_bytes();
      scan->gap_start = offset;
    } else {
      // Its end as its header gives it (a cut-off segment ends past the file).
      const uint64_t end = view.total_bytes() > 0 ? offset + view.total_bytes() : offset + 8;
      scan->lost.push_back(absl::StrFormat(
          "%s: %s lost (ids unknown)",
          error.ok() ? absl::StrFormat("segment %u at bytes %u..%u is cut short (the file ends at "
                                       "byte %u)",
                                       h.segment_number, offset, end, file.size())
                     : std::string(error.message()),
          DocumentRange(h.first_doc, h.first_doc + h.doc_count)));
      scan->gap_start = std::min<uint64_t>(end, file.size());
      offset += 8;
    }
    scan->next_number = h.segment_number + 1;
    scan->next_doc = h.first_doc + h.doc_count;
  }
}

// Adds the live documents of the readable segments to out->live.
void KeepLive(const Scan& scan, Salvage* out) {
  absl::flat_hash_set<uint64_t> retired;
  for (const SegmentView& segment : scan.segments) {
    for (uint64_t i = 0; i < segment.header().retired_count; ++i) {
      retired.insert(segment.retired(i));
    }
  }
  // A lost segment may have replaced a document: the later of equal ids wins.
  absl::flat_hash_map<std::string_view, uint64_t> last_of_id;
  for (const SegmentView& segment : scan.segments) {
    for (uint32_t local = 0; local < segment.doc_count(); ++local) {
      const uint64_t doc = segment.header().first_doc + local;
      if (!retired.contains(doc)) last_of_id[segment.id(local)] = doc;
    }
  }
  std::vector<uint64_t> shingles;
  for (const SegmentView& segment : scan.segments) {
    for (uint32_t local = 0; local < segment.doc_count(); ++local) {
      const uint64_t doc = segment.header().first_doc + local;
      const std::string_view id = segment.id(local);
      if (retired.contains(doc) || last_of_id[id] != doc) continue;
      const DocRecord record = segment.doc(local);
      const std::string_view bytes = segment.shingle_bytes(local);
      shingles.clear();
      if (Checksum(bytes) != record.shingles_checksum ||
          !DecodeShingleSet(bytes, record.shingle_count, &shingles)) {
        const uint64_t at = segment.shingle_offset(local);
        out->lost.push_back(absl::StrFormat(
            "document \"%s\" (number %u): shingle set at bytes %u..%u does not verify", id, doc, at,
            at + record.shingles_length));
        continue;
      }
      out->live.Add(
          std::string(id),
          KeepFacts{record.text_length, record.priority, (record.flags & kDocFlagHasPriority) != 0},
          DocumentOrigin{}, shingles, segment.signature(local));
    }
  }
}

}  // namespace

absl::Status SalvageIndex(std::string_view file, Salvage* out) {
  size_t header_size = 0;
  uint32_t version = 0;
  IndexSettings settings;
  absl::Status header = DecodeFileHeader(file, &settings, &header_size, &version);
  if (!header.ok()) {
    return WithMessage(header, absl::StrCat(header.message(),
                                            "; the settings are unknown, so nothing "
                                            "can be salvaged"));
  }
  Scan scan;
  CommitArea area;
  const absl::Status commits = version >= 2 ? ReadCommitArea(file, &area) : absl::OkStatus();
  const bool recorded = version >= 2 && commits.ok();
  if (!commits.ok()) {
    scan.lost.push_back(absl::StrCat(commits.message(),
                                     ": how much the file committed is unknown; any segments "
                                     "after the readable ones are lost"));
  }
  uint64_t end = file.size();
  if (recorded) end = std::min<uint64_t>(end, area.current.committed_length);
  ScanSegments(file.substr(0, end), version == 1 ? header_size : kDataStart,
               settings.signature.perms, &scan);
  if (recorded && scan.next_number < area.current.segment_count) {
    const uint32_t missing = area.current.segment_count - scan.next_number;
    scan.lost.push_back(absl::StrFormat(
        "committed %s at bytes %u..%u %s missing or damaged (the file is %u bytes): %s lost (ids "
        "unknown)",
        missing > 1
            ? absl::StrFormat("segments %u..%u", scan.next_number, area.current.segment_count - 1)
            : absl::StrFormat("segment %u", scan.next_number),
        scan.gap_start, area.current.committed_length, missing > 1 ? "are" : "is", file.size(),
        DocumentRange(scan.next_doc, area.current.document_count)));
  } else if (!recorded && scan.gap_start < end) {
    scan.lost.push_back(absl::StrFormat(
        "bytes %u..%u after the last readable segment%s could not be read%s", scan.gap_start, end,
        version >= 2 ? " (the commit area does not verify)" : "",
        version == 1 ? " (format version 1 does not record whether they were committed)" : ""));
  }
  out->settings = settings;
  out->live = SignedCorpus(settings.signature.perms);
  out->lost = std::move(scan.lost);
  KeepLive(scan, out);
  return absl::OkStatus();
}

}  // namespace kindred::index
