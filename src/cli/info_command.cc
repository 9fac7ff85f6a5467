// kindred info: describe an index: settings, counts, segments, sizes, the
// stored band/row choice and its candidate probability at the threshold.
#include <cstdio>

#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/formats.h"
#include "cli/index_options.h"
#include "cli/output.h"
#include "core/plural.h"
#include "kindred/banding.h"
#include "kindred/index.h"
#include "kindred/records.h"
#include "kindred/text.h"
#include "service/index_info.h"

namespace kindred::cli {
namespace {

struct InfoFlags {
  std::string index;
  std::string format = "text";
};

std::string TextReport(const IndexReader& reader) {
  const IndexSettings& s = reader.settings();
  std::string out;
  absl::StrAppendFormat(&out, "index            %s\n", reader.path());
  if (reader.format_version() == 1) {
    absl::StrAppendFormat(&out,
                          "format version   1 (records no commits; kindred compact rewrites it as "
                          "version 2, which add needs)\n");
  } else {
    absl::StrAppendFormat(&out, "format version   %u (commit generation %u%s)\n",
                          reader.format_version(), reader.commit_generation(),
                          reader.damaged_commit_slots() > 0
                              ? "; one commit slot does not verify: an interrupted commit"
                              : "");
  }
  absl::StrAppendFormat(&out, "signature        %s\n", s.signature.ToString());
  absl::StrAppendFormat(&out, "unicode          %s%s\n", s.unicode_version,
                        s.unicode_version == UnicodeVersionString()
                            ? ""
                            : absl::StrFormat(" (this program: %s)", UnicodeVersionString()));
  absl::StrAppendFormat(&out, "banding          %s (%u of %u slots)\n",
                        BandsByRows(s.bands, s.rows), s.bands * s.rows, s.signature.perms);
  absl::StrAppendFormat(&out, "threshold        %s >= %g (candidate probability there %.4f)\n",
                        MeasureName(s.measure), s.threshold,
                        CandidateProbability(s.threshold, s.bands, s.rows));
  if (s.containment.stored()) {
    absl::StrAppendFormat(&out,
                          "containment keys for containment >= %g, smaller document at least %u "
                          "shingles, %u size partitions\n",
                          s.containment.threshold, s.containment.min_size,
                          s.containment.partitions);
  }
  absl::StrAppendFormat(&out, "documents        %u live, %u retired, %u in all\n",
                        reader.live_count(), reader.document_count() - reader.live_count(),
                        reader.document_count());
  absl::StrAppendFormat(&out, "size             %u bytes (%u committed)\n", reader.file_size(),
                        reader.committed_size());
  if (reader.torn_tail_bytes() > 0 && reader.format_version() == 1) {
    absl::StrAppendFormat(&out,
                          "unread tail      %s at byte %u after the last whole segment (an "
                          "interrupted write or a cut-off segment; ignored; see kindred audit)\n",
                          Counted(reader.torn_tail_bytes(), "byte"), reader.committed_size());
  } else if (reader.torn_tail_bytes() > 0) {
    absl::StrAppendFormat(&out,
                          "torn tail        %s at byte %u after the last recorded commit (an "
                          "interrupted write; ignored; the next add or audit --repair cuts it "
                          "off)\n",
                          Counted(reader.torn_tail_bytes(), "byte"), reader.committed_size());
  }
  absl::StrAppendFormat(&out, "segments         %u\n", reader.segments().size());
  absl::StrAppendFormat(&out, "  %7s %12s %12s %10s %10s %8s %12s %12s\n", "segment", "offset",
                        "bytes", "first_doc", "documents", "retired", "band_keys", "shingle_bytes");
  for (const SegmentInfo& seg : reader.segments()) {
    absl::StrAppendFormat(&out, "  %7u %12u %12u %10u %10u %8u %12u %12u\n", seg.number, seg.offset,
                          seg.bytes, seg.first_doc, seg.documents, seg.retired, seg.band_keys,
                          seg.shingle_bytes);
  }
  return out;
}

int RunInfo(const InfoFlags& flags) {
  absl::StatusOr<OutputFormat> format = ParseOutputFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  ReportStaleTempFiles(flags.index);
  auto reader = IndexReader::Open(flags.index);
  if (!reader.ok()) return Fail(reader.status());
  std::string out =
      *format == OutputFormat::kJson ? service::IndexInfoJson(**reader) : TextReport(**reader);
  if (absl::Status written = WriteOutputFile("-", out); !written.ok()) {
    return Fail(kExitOutput, written);
  }
  return kExitOk;
}

}  // namespace

void RegisterInfo(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<InfoFlags>();
  CLI::App* command = app.add_subcommand(
      "info", "Describe an index: settings, counts, segments, sizes, band/row choice");
  command->add_option("index", flags->index, "the index file")->required();
  AddFormatOption(command, &flags->format, {"text", "json"}, {{"jsonl", "json"}});
  command->callback([flags, exit_code] { *exit_code = RunInfo(*flags); });
}

}  // namespace kindred::cli
