// kindred add: append documents to an index as a new segment, reporting
// each new document's confirmed matches among the indexed documents and
// among the new batch.
#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/index_options.h"
#include "cli/output.h"
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
  GivenOptions given;
};

int WriteExitCode(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kResourceExhausted:
    case absl::StatusCode::kAborted:
    case absl::StatusCode::kPermissionDenied:
      return kExitOutput;
    default:
      return ExitCodeFor(status);
  }
}

void PrintSummary(const AddFlags& flags, const AppendResult& result, const SignedCorpus& batch,
                  size_t match_count, const IndexReader& after) {
  for (size_t i = 0; i < batch.size(); ++i) {
    if (result.actions[i] != AddAction::kAdded) {
      std::fprintf(stderr, "kindred: %s: id already indexed: %s\n", batch.id(i).c_str(),
                   AddActionName(result.actions[i]));
    }
  }
  std::string segment = result.wrote_segment ? absl::StrFormat("segment %u", result.segment_number)
                                             : std::string("nothing written");
  std::fprintf(stderr,
               "kindred add: %s: %u added, %u replaced, %u skipped (%s); %zu matches; "
               "%u documents live\n",
               flags.index.c_str(), result.added, result.replaced, result.skipped, segment.c_str(),
               match_count, after.live_count());
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
  auto writer = IndexWriter::Open(flags.index);  // takes the lock first: busy fails at once
  if (!writer.ok()) return Fail(WriteExitCode(writer.status()), writer.status());
  if ((*writer)->torn_tail_cut() > 0 && !flags.general.quiet) {
    std::fprintf(stderr, "kindred: cut a torn tail of %llu bytes off %s\n",
                 static_cast<unsigned long long>((*writer)->torn_tail_cut()), flags.index.c_str());
  }
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
  IndexMatchOptions options{match, threads, false};
  options.max_bucket = flags.max_bucket;
  uint64_t crowded = 0;
  options.crowded_keys = &crowded;
  auto matches = MatchForQuery(**reader, batch, *policy, options);
  if (!matches.ok()) return Fail(matches.status());
  auto appended = (*writer)->Append(batch, *policy);
  if (!appended.ok()) return Fail(WriteExitCode(appended.status()), appended.status());
  std::string out;
  WriteMatchRecords(*format, *matches, **reader, batch, &out);
  if (absl::Status written = WriteOutputFile("-", out); !written.ok()) {
    return Fail(kExitOutput, written);
  }
  if (!flags.general.quiet) {
    PrintSummary(flags, *appended, batch, matches->size(), (*writer)->reader());
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
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  AddMaxBucketOption(command, &flags->max_bucket);
  command
      ->add_option("--on-duplicate", flags->on_duplicate,
                   "a document whose id is already indexed: error (refuse the batch), skip "
                   "(keep the indexed one) or replace")
      ->default_str("error");
  command->add_option("--format", flags->format, "record format: jsonl, tsv or csv")
      ->default_str("jsonl")
      ->group("Output");
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, command, exit_code] {
    flags->given = OptionsGiven(command);
    *exit_code = RunAdd(*flags);
  });
}

}  // namespace kindred::cli
