// kindred check: match documents (uploads) against an index, read-only.
//
// Exit status: 0, or 1 with --fail-on-match when any upload matched an
// indexed document, so a shell script can gate on it.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/index_batch.h"
#include "cli/index_options.h"
#include "cli/record_counts.h"
#include "core/plural.h"
#include "kindred/index.h"
#include "kindred/index_query.h"

namespace kindred::cli {
namespace {

struct CheckFlags {
  BatchFlags batch;
  bool fail_on_match = false;
};

// Median, 99th percentile and largest of the per-document match times
// (nearest rank), on stderr.
void PrintLatencies(std::vector<double> seconds) {
  std::sort(seconds.begin(), seconds.end());
  auto rank = [&seconds](double q) {
    const size_t k = static_cast<size_t>(std::ceil(q * static_cast<double>(seconds.size())));
    return seconds[std::min(seconds.size() - 1, k == 0 ? 0 : k - 1)] * 1e3;
  };
  std::fprintf(stderr,
               "  latency per document: median %.3f ms, 99th percentile %.3f ms, largest %.3f ms "
               "(%s; band lookup and exact verification, signing not included)\n",
               rank(0.5), rank(0.99), seconds.back() * 1e3,
               Counted(seconds.size(), "document").c_str());
}

int RunCheck(const CheckFlags& check) {
  const BatchFlags& flags = check.batch;
  BatchRequest request;
  if (int code = ParseBatchFlags(flags, &request); code != kExitOk) return code;
  ReportStaleTempFiles(flags.index);
  auto reader = IndexReader::Open(flags.index);
  if (!reader.ok()) return Fail(reader.status());
  if ((*reader)->torn_tail_bytes() > 0 && !flags.general.quiet) {
    std::fprintf(stderr, "kindred: warning: index %s has a torn tail of %s (ignored)\n",
                 flags.index.c_str(), Counted((*reader)->torn_tail_bytes(), "byte").c_str());
  }
  MatchedBatch batch;
  if (int code =
          MatchBatch(flags, request, reader->get(), std::nullopt, flags.general.verbose, &batch);
      code != kExitOk) {
    return code;
  }
  if (int code = WriteBatchMatches(request, batch, **reader); code != kExitOk) return code;
  const size_t matched_count = CountMatchedUploads(batch.matches, batch.documents->size());
  if (!flags.general.quiet) {
    std::fprintf(stderr,
                 "kindred check: %s checked against %u indexed (%s >= %g, %s): %s indexed "
                 "documents, %llu empty\n",
                 Counted(batch.documents->size(), "document").c_str(), (*reader)->live_count(),
                 MeasureName(batch.match.measure), batch.match.threshold,
                 CandidateSearchText(**reader, batch.match).c_str(),
                 // the verb: "1 matches", "2 match"
                 Counted(matched_count, "matches", "match").c_str(),
                 static_cast<unsigned long long>(batch.stats.empty_documents));
    PrintCrowdedKeys(batch.crowded_keys, flags.max_bucket);
    PrintHtmlPages(batch.stats);
  }
  if (flags.general.verbose && !batch.latencies.empty()) PrintLatencies(batch.latencies);
  return check.fail_on_match && matched_count > 0 ? kExitMatched : kExitOk;
}

}  // namespace

void RegisterCheck(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<CheckFlags>();
  CLI::App* command =
      app.add_subcommand("check", "Match documents (uploads) against an index without changing it");
  AddBatchOptions(command, &flags->batch, /*stored_priority=*/false);
  AddFormatOption(command, &flags->batch.format, {"jsonl", "tsv", "csv"});
  command
      ->add_flag("--fail-on-match", flags->fail_on_match,
                 "exit with status 1 when any document matches an indexed document")
      ->group("Output");
  AddGeneralOptions(command, &flags->batch.general);
  command->callback([flags, command, exit_code] {
    flags->batch.given = OptionsGiven(command);
    *exit_code = RunCheck(*flags);
  });
}

}  // namespace kindred::cli
