#include "cli/formats.h"

#include "absl/strings/str_cat.h"
#include "cli/usage.h"

namespace kindred::cli {
namespace {

// "jsonl (default), tsv or csv; json is the same as jsonl"
std::string Describe(const std::vector<std::string>& names, const std::vector<FormatAlias>& aliases,
                     const std::string& default_name) {
  std::vector<std::string> words;
  for (const std::string& name : names) {
    words.push_back(name == default_name ? absl::StrCat(name, " (default)") : name);
  }
  std::string out = absl::StrCat("output format: ", ListWords(words));
  for (const FormatAlias& alias : aliases) {
    absl::StrAppend(&out, "; ", alias.alias, " is the same as ", alias.canonical);
  }
  return out;
}

}  // namespace

const char* OutputFormatName(OutputFormat format) {
  switch (format) {
    case OutputFormat::kText:
      return "text";
    case OutputFormat::kJson:
      return "json";
    case OutputFormat::kJsonLines:
      return "jsonl";
    case OutputFormat::kTsv:
      return "tsv";
    case OutputFormat::kCsv:
      return "csv";
  }
  return "text";
}

absl::StatusOr<OutputFormat> ParseOutputFormat(std::string_view name) {
  for (OutputFormat format : {OutputFormat::kText, OutputFormat::kJson, OutputFormat::kJsonLines,
                              OutputFormat::kTsv, OutputFormat::kCsv}) {
    if (name == OutputFormatName(format)) return format;
  }
  return absl::InvalidArgumentError(
      absl::StrCat("--format: expected text, json, jsonl, tsv or csv, not \"",
                   absl::string_view(name.data(), name.size()), "\""));
}

CLI::Option* AddFormatOption(CLI::App* command, std::string* format, std::vector<std::string> names,
                             std::vector<FormatAlias> aliases) {
  const std::string help = Describe(names, aliases, *format);
  std::vector<std::string> accepted = names;
  for (const FormatAlias& alias : aliases) accepted.push_back(alias.alias);
  CLI::Validator check(
      [names = std::move(names), aliases = std::move(aliases),
       accepted = std::move(accepted)](std::string& value) -> std::string {
        for (const FormatAlias& alias : aliases) {
          if (value == alias.alias) {
            value = alias.canonical;
            return std::string();
          }
        }
        for (const std::string& name : names) {
          if (value == name) return std::string();
        }
        return absl::StrCat("expected ", accepted.size() > 1 ? "one of " : "", ListWords(accepted),
                            ", not \"", value, "\"");
      },
      "");
  return command->add_option("--format", *format, help)
      ->transform(check)
      ->default_str(*format)
      ->group("Output");
}

}  // namespace kindred::cli
