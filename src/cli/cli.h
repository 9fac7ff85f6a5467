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
#include "cli/exit_codes.h"

namespace kindred::cli {

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
