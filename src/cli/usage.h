// Usage errors in one style. Every mistake on the command line, whether CLI11
// finds it while parsing or a command finds it while checking its settings,
// reads
//
//     kindred: <command>: <what is wrong>
//
// on stderr and ends the process with kExitUsage (2). This file holds the
// pieces: the name of the command being run, validators for whole-number
// and choice options (so that "-1", "1e3", "010" or a value beyond the
// option's range never turn silently into another number), and the CLI11
// failure-message hook that rewords CLI11's own errors.
//
// Not thread-safe: the command name is set once by main() before parsing.
#ifndef KINDRED_CLI_USAGE_H_
#define KINDRED_CLI_USAGE_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "CLI/CLI.hpp"

namespace kindred::cli {

// The most threads any command accepts for --threads (documented in the
// README under "Threads"): more only adds memory and thread start-up cost on
// any machine this program is meant for.
inline constexpr uint64_t kMaxThreads = 256;

// The command named on the command line ("sweep", ...), found by main()
// before parsing so that parse errors can name it; empty when none was given.
void SetCommandName(std::string_view name);
const std::string& CommandName();

// Sets the command name from the first argument that is not an option (the
// program itself has no option taking a value). When that argument names no
// command, prints "kindred: unknown command ..." and returns false.
bool FindCommandName(const CLI::App& app, int argc, char** argv);

// "kindred: <command>: " (or "kindred: " without a command): the start of
// every usage error message.
std::string UsagePrefix();

// Accepts a whole number in [min, max] written in decimal digits, or in hex
// after "0x" (as `info` prints seeds); nothing else: no sign, no fraction, no
// exponent. Rewrites the value to plain decimal, so CLI11 converts exactly
// the number checked. The message names the range, e.g. "expected a whole
// number from 1 to 256, not \"0\"".
// Attach it with Option::transform(): Option::check() discards the rewrite.
CLI::Validator WholeNumber(uint64_t min, uint64_t max);

// Accepts exactly one of `names` (case-sensitive); the message lists them:
// "expected one of text, jsonl or json, not \"xml\"".
CLI::Validator OneOf(std::vector<std::string> names);

// "a, b or c": the words of a list in a message.
std::string ListWords(const std::vector<std::string>& words);

// The CLI11 failure-message hook (CLI::App::failure_message): one line in the
// style above for every CLI11 parse error.
std::string ParseErrorMessage(const CLI::App* app, const CLI::Error& error);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_USAGE_H_
