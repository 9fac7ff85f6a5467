// Options of the commands that query an index (add, check, sweep --index):
// the signature flags must agree with the index's stored settings, and the
// threshold, measure and banding default to the stored ones.
#ifndef KINDRED_CLI_INDEX_OPTIONS_H_
#define KINDRED_CLI_INDEX_OPTIONS_H_

#include "CLI/CLI.hpp"
#include "absl/status/statusor.h"
#include "cli/common_options.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"
#include "kindred/signed_corpus.h"

namespace kindred::cli {

// Which of the signature and match options the user gave explicitly.
struct GivenOptions {
  bool signature = false;
  bool threshold = false;
  bool measure = false;
};

// Reads, after parsing, which options of `command` were on the command line.
GivenOptions OptionsGiven(CLI::App* command);

// Fails (FailedPrecondition) when explicitly given signature options differ
// from the index's; prints a warning when only the Unicode/ICU version does.
absl::Status CheckIndexSignature(const SignatureFlags& flags, const GivenOptions& given,
                                 const IndexReader& reader);

// The query's match settings: the stored threshold and measure unless given.
// A threshold given without --bands/--rows gets the banding chosen for it;
// the reader is re-banded when the banding differs from the stored one.
absl::StatusOr<MatchSettings> IndexQueryMatch(const MatchFlags& flags, const GivenOptions& given,
                                              IndexReader* reader);

// Both steps for a command that queries an index: checks the signature
// options against it, then works out the query's match settings into
// *match. Returns kExitOk, or the exit code after printing the error (5 for
// other settings than the index's, 2 for invalid options).
int PrepareIndexQuery(const SignatureFlags& signature, const MatchFlags& match_flags,
                      const GivenOptions& given, IndexReader* reader, MatchSettings* match);

// The summary line for the crowded index keys a check or add met (none:
// nothing printed).
void PrintCrowdedKeys(uint64_t crowded, uint64_t max_bucket);

// Removes temporary files of `index` left by interrupted processes that no
// longer run ("INDEX.tmp.PID", "INDEX.building.PID"), saying so on stderr.
void ReportStaleTempFiles(const std::string& index);

// Opens `index` for writing as add and remove do: removes stale temporary
// files (ReportStaleTempFiles), takes the writer lock, waiting up to
// `wait_lock` seconds (0: fails at once when busy), and says on stderr when a
// torn tail was cut, unless `quiet`. On failure prints the message, sets
// *exit_code and returns null.
std::unique_ptr<IndexWriter> OpenIndexForWriting(const std::string& index, double wait_lock,
                                                 bool quiet, int* exit_code);

// Reads and signs every input under `signature` (for add and check).
// Errors are the reader's (exit 3).
absl::Status SignInputs(const std::vector<std::string>& inputs, const InputOptions& input_options,
                        const SignatureSettings& signature, int threads, SignedCorpus* out,
                        SignStats* stats);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_INDEX_OPTIONS_H_
