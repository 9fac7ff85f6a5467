// kindred add: append documents to an index as a new segment, reporting
// each new document's confirmed matches among the indexed documents and
// among the new batch.
#include <cstdio>

#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/index_batch.h"
#include "cli/index_options.h"
#include "cli/record_counts.h"
#include "core/plural.h"
#include "kindred/index.h"
#include "kindred/index_query.h"
#include "kindred/index_writer.h"
#include "kindred/signed_corpus.h"

namespace kindred::cli {
namespace {

struct AddFlags {
  BatchFlags batch;
  std::string on_duplicate = "error";
  double wait_lock = 0;
};

// The summary line names the threshold and banding the matches were found
// with, as check's does.
void PrintSummary(const std::string& index, const AppendResult& result, const SignedCorpus& batch,
                  size_t match_count, const MatchSettings& match, const IndexReader& matched,
                  const IndexReader& after) {
  for (size_t i = 0; i < batch.size(); ++i) {
    if (result.actions[i] != AddAction::kAdded) {
      std::fprintf(stderr, "kindred: %s: id already indexed: %s\n", batch.id(i).c_str(),
                   AddActionName(result.actions[i]));
    }
  }
  std::string segment = result.wrote_segment ? absl::StrFormat("segment %u", result.segment_number)
                                             : std::string("nothing written");
  std::fprintf(stderr,
               "kindred add: %s: %u added, %u replaced, %u skipped (%s); %s (%s >= %g, %s); "
               "%s live\n",
               index.c_str(), result.added, result.replaced, result.skipped, segment.c_str(),
               Counted(match_count, "match", "matches").c_str(), MeasureName(match.measure),
               match.threshold, CandidateSearchText(matched, match).c_str(),
               Counted(after.live_count(), "document").c_str());
}

int RunAdd(const AddFlags& add) {
  const BatchFlags& flags = add.batch;
  auto policy = ParseDuplicateIdPolicy(add.on_duplicate);
  if (!policy.ok()) return Fail(kExitUsage, policy.status());
  BatchRequest request;
  if (int code = ParseBatchFlags(flags, &request); code != kExitOk) return code;
  if (add.wait_lock < 0) {
    return Fail(kExitUsage, absl::InvalidArgumentError("--wait-lock must be 0 or more seconds"));
  }
  // Takes the lock first: busy fails at once (or after --wait-lock).
  int exit_code = kExitOk;
  std::unique_ptr<IndexWriter> writer =
      OpenIndexForWriting(flags.index, add.wait_lock, flags.general.quiet, &exit_code);
  if (writer == nullptr) return exit_code;
  auto reader = IndexReader::Open(flags.index);  // for matching, banded as asked
  if (!reader.ok()) return Fail(reader.status());
  MatchedBatch batch;
  if (int code = MatchBatch(flags, request, reader->get(), *policy, /*timed=*/false, &batch);
      code != kExitOk) {
    return code;
  }
  auto appended = writer->Append(*batch.documents, *policy);
  if (!appended.ok()) return Fail(appended.status());
  if (int code = WriteBatchMatches(request, batch, **reader); code != kExitOk) return code;
  if (!flags.general.quiet) {
    PrintSummary(flags.index, *appended, *batch.documents, batch.matches.size(), batch.match,
                 **reader, writer->reader());
    PrintCrowdedKeys(batch.crowded_keys, flags.max_bucket);
    PrintHtmlPages(batch.stats);
  }
  return kExitOk;
}

}  // namespace

void RegisterAdd(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<AddFlags>();
  CLI::App* command = app.add_subcommand(
      "add", "Append documents to an index as a new segment, reporting their matches");
  AddBatchOptions(command, &flags->batch, /*stored_priority=*/true);
  AddWaitLockOption(command, &flags->wait_lock);
  command
      ->add_option("--on-duplicate", flags->on_duplicate,
                   "a document whose id is already indexed: error (refuse the batch), skip "
                   "(keep the indexed one) or replace")
      ->default_str("error");
  AddFormatOption(command, &flags->batch.format, {"jsonl", "tsv", "csv"});
  AddGeneralOptions(command, &flags->batch.general);
  command->callback([flags, command, exit_code] {
    flags->batch.given = OptionsGiven(command);
    *exit_code = RunAdd(*flags);
  });
}

}  // namespace kindred::cli
