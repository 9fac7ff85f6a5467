// Checks, made before any input is read, that the outputs a command will
// write can be written: a failure then costs nothing, instead of coming at
// the end of the work.
//
// Each check does what the real write will do first, then undoes it: it
// creates a temporary file (or directory) where the output will go and
// removes it at once. Parent directories that the real write would create
// are created (and left in place).
#ifndef KINDRED_CLI_OUTPUT_CHECKS_H_
#define KINDRED_CLI_OUTPUT_CHECKS_H_

#include <string>

#include "absl/status/status.h"

namespace kindred::cli {

// A file written by WriteOutputFile (its directory must exist). "-" and ""
// are fine. Aborted ("cannot write PATH: reason") when it cannot be written.
absl::Status CheckOutputFile(const std::string& path);

// A file written by the kept-corpus writer (missing parents are created).
// An invalid name (too long, ...) stays InvalidArgument, as in the writer.
absl::Status CheckKeptFile(const std::string& path);

// A directory that will receive files (created with its parents).
absl::Status CheckOutputDirectory(const std::string& dir);

// A new or empty directory built whole by the kept-corpus writer.
absl::Status CheckCopyDirectory(const std::string& dir);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_OUTPUT_CHECKS_H_
