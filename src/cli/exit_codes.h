// The program's exit codes, and the one place error kinds become them
// (shared by the program and its HTTP service module, src/serve/).
#ifndef KINDRED_CLI_EXIT_CODES_H_
#define KINDRED_CLI_EXIT_CODES_H_

#include "absl/status/status.h"

namespace kindred::cli {

// Exit codes. Documented in README.md ("Exit codes"); keep the two in step.
enum ExitCode : int {
  kExitOk = 0,
  kExitMatched = 1,        // check --fail-on-match: at least one upload matched
  kExitUsage = 2,          // bad command line or invalid settings
  kExitInput = 3,          // unreadable or malformed input, a limit exceeded,
                           // an input that changed between two readings
  kExitIndexCorrupt = 4,   // index file corrupt, truncated or not an index
  kExitIndexMismatch = 5,  // index made with other settings or a newer format
  kExitIndexBusy = 6,      // another writer holds the index lock
  kExitOutput = 7,         // an output could not be written (disk full, ...)
  kExitInternal = 8,       // a bug: please report it
};

// The exit code of a library status, by its kind (kindred/errors.h: KindOf):
// invalid request -> 2; bad input, limit exceeded, input changed -> 3;
// index damaged -> 4; settings mismatch -> 5; index busy -> 6; disk full,
// write failed -> 7; internal -> 8. The one place kinds become exit codes.
int ExitCodeFor(const absl::Status& status);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_EXIT_CODES_H_
