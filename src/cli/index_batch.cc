#include "cli/index_batch.h"

#include "cli/cli.h"
#include "cli/output.h"
#include "kindred/index_query.h"

namespace kindred::cli {

void AddBatchOptions(CLI::App* command, BatchFlags* flags, bool stored_priority) {
  command->add_option("index", flags->index, "the index file")->required();
  AddInputsArgument(command, &flags->inputs)->required();
  AddInputOptions(command, &flags->input);
  if (stored_priority) AddPriorityFieldOption(command, &flags->input, /*stored=*/true);
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  AddMaxBucketOption(command, &flags->max_bucket);
}

int ParseBatchFlags(const BatchFlags& flags, BatchRequest* request) {
  auto format = ParseRecordFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  request->format = *format;
  auto input_options = ToInputOptions(flags.input);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  request->input = *std::move(input_options);
  if (absl::Status valid = ValidMaxBucket(flags.max_bucket); !valid.ok()) {
    return Fail(kExitUsage, valid);
  }
  return kExitOk;
}

int MatchBatch(const BatchFlags& flags, const BatchRequest& request, IndexReader* reader,
               std::optional<DuplicateIdPolicy> policy, bool timed, MatchedBatch* batch) {
  if (int code =
          PrepareIndexQuery(flags.signature, flags.match, flags.given, reader, &batch->match);
      code != kExitOk) {
    return code;
  }
  const int threads = ThreadCount(flags.general);
  const SignatureSettings& signature = reader->settings().signature;
  batch->documents = std::make_unique<SignedCorpus>(signature.perms);
  if (absl::Status status = SignInputs(flags.inputs, request.input, signature, threads,
                                       batch->documents.get(), &batch->stats);
      !status.ok()) {
    return Fail(kExitInput, status);
  }
  // Under an add policy a document whose id is indexed is never its own
  // match: with replace the indexed copy is retired, with skip the new one
  // is not added (and with error the batch is refused). MatchForQuery sets
  // this from the policy.
  IndexMatchOptions options{batch->match, threads, false};
  options.max_bucket = flags.max_bucket;
  options.crowded_keys = &batch->crowded_keys;
  if (timed) options.query_seconds = &batch->latencies;
  auto matches = MatchForQuery(*reader, *batch->documents, policy, options);
  if (!matches.ok()) return Fail(matches.status());
  batch->matches = *std::move(matches);
  return kExitOk;
}

int WriteBatchMatches(const BatchRequest& request, const MatchedBatch& batch,
                      const IndexReader& reader) {
  std::string out;
  WriteMatchRecords(request.format, batch.matches, reader, *batch.documents, &out, &batch.match);
  if (absl::Status written = WriteOutputFile("-", out); !written.ok()) {
    return Fail(kExitOutput, written);
  }
  return kExitOk;
}

}  // namespace kindred::cli
