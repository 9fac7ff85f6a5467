// The --format vocabulary, one for every command (README "Output formats"):
//
//   text   aligned tables and sentences for people
//   jsonl  JSON Lines: one JSON object per line, any number of lines
//   json   one JSON object (commands that print a single object)
//   tsv    tab-separated values with a header line (\t \n \r \\ escaped)
//   csv    comma-separated values with a header line (RFC 4180 quoting)
//
// Each command accepts the names that make sense for what it prints, plus
// aliases that keep older command lines working: a command printing one
// JSON object takes `jsonl` as well as `json` (one object on one line is a
// JSON Lines file of one record), with the same bytes.
#ifndef KINDRED_CLI_FORMATS_H_
#define KINDRED_CLI_FORMATS_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "CLI/CLI.hpp"
#include "absl/status/statusor.h"

namespace kindred::cli {

// The names of the vocabulary. The record formats (jsonl, tsv, csv) are the
// library's RecordFormat (records.h): a command that writes records parses
// them with ParseRecordFormat.
enum class OutputFormat : uint8_t { kText, kJson, kJsonLines, kTsv, kCsv };

// "text", "json", "jsonl", "tsv", "csv".
const char* OutputFormatName(OutputFormat format);
// The inverse of OutputFormatName (InvalidArgument for any other name).
absl::StatusOr<OutputFormat> ParseOutputFormat(std::string_view name);

struct FormatAlias {
  std::string alias;      // accepted on the command line
  std::string canonical;  // what the command sees
};

// Adds --format to `command`, bound to *format (whose value is the default).
// Accepts `names` and the aliases; an alias is rewritten to its canonical
// name before the command runs, so a command compares with canonical names
// only. Anything else is a usage error: "--format: expected one of jsonl,
// tsv or csv, not \"xml\"".
CLI::Option* AddFormatOption(CLI::App* command, std::string* format, std::vector<std::string> names,
                             std::vector<FormatAlias> aliases = {});

}  // namespace kindred::cli

#endif  // KINDRED_CLI_FORMATS_H_
