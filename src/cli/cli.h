// The command-line front end: shared plumbing for the command files.
//
// Each command lives in its own file src/cli/<name>_command.cc and exposes one
// Register function that adds a CLI11 subcommand to the application. When the
// subcommand runs, its callback stores the process exit code in *exit_code.
// Library errors arrive as absl::Status; Fail() prints one clear message on
// stderr and returns the documented exit code.
#ifndef KINDRED_CLI_CLI_H_
#define KINDRED_CLI_CLI_H_

#include <string_view>

#include "CLI/CLI.hpp"
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

// Prints "kindred: <status message>" on stderr and returns `exit_code`.
int Fail(int exit_code, const absl::Status& status);
// Same, with the exit code chosen by ExitCodeFor(status).
int Fail(const absl::Status& status);

// Registration of each command (one per file).
void RegisterSweep(CLI::App& app, int* exit_code);
void RegisterPlan(CLI::App& app, int* exit_code);
void RegisterBuild(CLI::App& app, int* exit_code);
void RegisterAdd(CLI::App& app, int* exit_code);
void RegisterCheck(CLI::App& app, int* exit_code);
void RegisterInfo(CLI::App& app, int* exit_code);
void RegisterAudit(CLI::App& app, int* exit_code);
void RegisterCompact(CLI::App& app, int* exit_code);
void RegisterTune(CLI::App& app, int* exit_code);
void RegisterExplain(CLI::App& app, int* exit_code);
void RegisterServe(CLI::App& app, int* exit_code);
void RegisterRemove(CLI::App& app, int* exit_code);
// --wait-lock SECONDS of the commands that write an index.
void AddWaitLockOption(CLI::App* command, double* seconds);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_CLI_H_
