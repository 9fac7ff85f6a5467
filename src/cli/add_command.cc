// kindred add: append documents to an index as a new segment, reporting
// each new document's confirmed matches among the indexed documents and
// among the new batch.
#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/index_options.h"
#include "cli/output.h"
#include "core/plural.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_query.h"
#include "kindred/index_writer.h"
#include "kindred/records.h"
#include "kindred/signed_corpus.h"
#include "kindred/text.h"

namespace kindred::cli {
namespace {

struct AddFlags {
  std::string index;
  std::vector<std::string> inputs;
  InputFlags input;
  SignatureFlags signature;
  MatchFlags match;
  GeneralFlags general;
  std::string format = "jsonl";
  std::string on_duplicate = "error";
  uint64_t max_bucket = kDefaultMaxBucket;
  double wait_lock = 0;
  GivenOptions given;
};

// The summary line names the threshold and banding the matches were found
// with, as check's does.
void PrintSummary(const AddFlags& flags, const AppendResult& result, const SignedCorpus& batch,
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
               flags.index.c_str(), result.added, result.replaced, result.skipped, segment.c_str(),
               Counted(match_count, "match", "matches").c_str(), MeasureName(match.measure),
               match.threshold, CandidateSearchText(matched, match).c_str(),
               Counted(after.live_count(), "document").c_str());
}

int RunAdd(const AddFlags& flags) {
  auto format = ParseRecordFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  auto policy = ParseDuplicateIdPolicy(flags.on_duplicate);
  if (!policy.ok()) return Fail(kExitUsage, policy.status());
  auto input_options = ToInputOptions(flags.input);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  if (absl::Status valid = ValidMaxBucket(flags.max_bucket); !valid.ok()) {
    return Fail(kExitUsage, valid);
  }
  if (flags.wait_lock < 0) {
    return Fail(kExitUsage, absl::InvalidArgumentError("--wait-lock must be 0 or more seconds"));
  }
  // Takes the lock first: busy fails at once (or after --wait-lock).
  int exit_code = kExitOk;
  std::unique_ptr<IndexWriter> writer =
      OpenIndexForWriting(flags.index, flags.wait_lock, flags.general.quiet, &exit_code);
  if (writer == nullptr) return exit_code;
  auto reader = IndexReader::Open(flags.index);  // for matching, banded as asked
  if (!reader.ok()) return Fail(reader.status());
  MatchSettings match;
  if (int code =
          PrepareIndexQuery(flags.signature, flags.match, flags.given, reader->get(), &match);
      code != kExitOk) {
    return code;
  }
  const int threads = ThreadCount(flags.general);
  const SignatureSettings& signature = (*reader)->settings().signature;
  SignedCorpus batch(signature.perms);
  SignStats stats;
  if (absl::Status status =
          SignInputs(flags.inputs, *input_options, signature, threads, &batch, &stats);
      !status.ok()) {
    return Fail(kExitInput, status);
  }
  // A document whose id is indexed is never its own match: with replace the
  // indexed copy is retired, with skip the new one is not added (and with
  // error the batch is refused). MatchForQuery sets this from the policy.
  IndexMatchOptions options{match, threads, false};
  options.max_bucket = flags.max_bucket;
  uint64_t crowded = 0;
  options.crowded_keys = &crowded;
  auto matches = MatchForQuery(**reader, batch, *policy, options);
  if (!matches.ok()) return Fail(matches.status());
  auto appended = writer->Append(batch, *policy);
  if (!appended.ok()) return Fail(IndexWriteExitCode(appended.status()), appended.status());
  std::string out;
  WriteMatchRecords(*format, *matches, **reader, batch, &out, &match);
  if (absl::Status written = WriteOutputFile("-", out); !written.ok()) {
    return Fail(kExitOutput, written);
  }
  if (!flags.general.quiet) {
    PrintSummary(flags, *appended, batch, matches->size(), match, **reader, writer->reader());
    PrintCrowdedKeys(crowded, flags.max_bucket);
  }
  return kExitOk;
}

}  // namespace

void RegisterAdd(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<AddFlags>();
  CLI::App* command = app.add_subcommand(
      "add", "Append documents to an index as a new segment, reporting their matches");
  command->add_option("index", flags->index, "the index file")->required();
  AddInputsArgument(command, &flags->inputs)->required();
  AddInputOptions(command, &flags->input);
  AddPriorityFieldOption(command, &flags->input, /*stored=*/true);
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  AddMaxBucketOption(command, &flags->max_bucket);
  AddWaitLockOption(command, &flags->wait_lock);
  command
      ->add_option("--on-duplicate", flags->on_duplicate,
                   "a document whose id is already indexed: error (refuse the batch), skip "
                   "(keep the indexed one) or replace")
      ->default_str("error");
  AddFormatOption(command, &flags->format, {"jsonl", "tsv", "csv"});
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, command, exit_code] {
    flags->given = OptionsGiven(command);
    *exit_code = RunAdd(*flags);
  });
}

}  // namespace kindred::cli
