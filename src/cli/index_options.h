// Options of the commands that query an index (add, check, sweep --index):
// the signature flags must agree with the index's stored settings, and the
// threshold, measure and banding default to the stored ones.
#ifndef KINDRED_CLI_INDEX_OPTIONS_H_
#define KINDRED_CLI_INDEX_OPTIONS_H_

#include "CLI/CLI.hpp"
#include "absl/status/statusor.h"
#include "cli/common_options.h"
#include "kindred/index.h"

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

}  // namespace kindred::cli

#endif  // KINDRED_CLI_INDEX_OPTIONS_H_
