#include "service/index_info.h"

#include "absl/strings/str_format.h"
#include "kindred/records.h"
#include "kindred/text.h"

namespace kindred::service {
namespace {

void AppendSegments(const IndexReader& reader, RecordWriter* record) {
  record->BeginList();
  for (const SegmentInfo& seg : reader.segments()) {
    RecordWriter item = record->ListItem({"segment", "offset", "bytes", "first_doc", "documents",
                                          "retired", "band_keys", "shingle_bytes"});
    for (uint64_t value : {uint64_t{seg.number}, uint64_t{seg.offset}, uint64_t{seg.bytes},
                           uint64_t{seg.first_doc}, uint64_t{seg.documents}, uint64_t{seg.retired},
                           uint64_t{seg.band_keys}, uint64_t{seg.shingle_bytes}}) {
      item.Number(value);
    }
    item.EndItem();
  }
  record->EndList();
}

}  // namespace

std::string IndexInfoJson(const IndexReader& reader) {
  const IndexSettings& s = reader.settings();
  std::string out;
  RecordWriter record(
      RecordFormat::kJsonLines,
      {"index", "format_version", "commit_generation", "shingle", "k", "seed", "signer", "perms",
       "unicode", "bands", "rows", "threshold", "measure", "documents", "live", "file_bytes",
       "committed_bytes", "torn_tail_bytes", "segments"},
      &out);
  record.String(reader.path());
  record.Number(reader.format_version());
  record.Number(reader.commit_generation());
  record.String(ShingleModeName(s.signature.mode));
  record.Number(s.signature.k);
  // The seed as the text form prints it: a 64-bit number does not survive
  // JSON readers that hold numbers as doubles.
  record.String(absl::StrFormat("0x%016x", s.signature.seed));
  record.String(SignerSchemeName(s.signature.scheme));
  record.Number(s.signature.perms);
  record.String(s.unicode_version);
  record.Number(s.bands);
  record.Number(s.rows);
  record.Real(s.threshold);
  record.String(MeasureName(s.measure));
  for (uint64_t value : {uint64_t{reader.document_count()}, uint64_t{reader.live_count()},
                         uint64_t{reader.file_size()}, uint64_t{reader.committed_size()},
                         uint64_t{reader.torn_tail_bytes()}}) {
    record.Number(value);
  }
  AppendSegments(reader, &record);
  record.EndRow();
  return out;
}

}  // namespace kindred::service
