// The core `kindred check` and `kindred add` share: reading a batch of
// documents, matching it against an index, and writing the match records.
// An add runs the same steps and appends the batch between matching and
// writing; nothing else differs in what the two report.
#ifndef KINDRED_CLI_INDEX_BATCH_H_
#define KINDRED_CLI_INDEX_BATCH_H_

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "CLI/CLI.hpp"
#include "cli/common_options.h"
#include "cli/index_options.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_writer.h"
#include "kindred/records.h"
#include "kindred/signed_corpus.h"

namespace kindred::cli {

// The options of check and add that decide what is read and matched.
struct BatchFlags {
  std::string index;
  std::vector<std::string> inputs;
  InputFlags input;
  SignatureFlags signature;
  MatchFlags match;
  GeneralFlags general;
  std::string format = "jsonl";
  uint64_t max_bucket = kDefaultMaxBucket;
  GivenOptions given;
};

// Registers the positional index and inputs, then the input options (and,
// when `stored_priority`, --priority-field as build and add store it), the
// signature and match options and --max-bucket.
void AddBatchOptions(CLI::App* command, BatchFlags* flags, bool stored_priority);

// The validated options of a batch.
struct BatchRequest {
  RecordFormat format = RecordFormat::kJsonLines;
  InputOptions input;
};

// Validates --format, the input options and --max-bucket into *request.
// Returns kExitOk, or the usage exit code after printing the error.
int ParseBatchFlags(const BatchFlags& flags, BatchRequest* request);

// A batch read and matched against an index.
struct MatchedBatch {
  MatchSettings match;                      // the query's settings
  std::unique_ptr<SignedCorpus> documents;  // signed as the index signs
  SignStats stats;
  std::vector<IndexMatch> matches;
  uint64_t crowded_keys = 0;      // crowded index keys met (--max-bucket)
  std::vector<double> latencies;  // per document, when asked for
};

// Checks the signature options against `reader`, works out the match
// settings (re-banding the reader when they ask for another banding), reads
// and signs the inputs, and matches them as a check (`policy` unset) or an
// add under `policy` does. With `timed`, records each document's match time.
// Returns kExitOk, or the exit code after printing the error (3 for the
// inputs, 5 for other settings than the index's, 2 for invalid options).
int MatchBatch(const BatchFlags& flags, const BatchRequest& request, IndexReader* reader,
               std::optional<DuplicateIdPolicy> policy, bool timed, MatchedBatch* batch);

// Writes the match records of `batch` on standard output. Returns kExitOk,
// or 7 after printing the error.
int WriteBatchMatches(const BatchRequest& request, const MatchedBatch& batch,
                      const IndexReader& reader);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_INDEX_BATCH_H_
