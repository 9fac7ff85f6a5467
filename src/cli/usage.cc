#include "cli/usage.h"

#include <cerrno>
#include <cstdio>
#include <cstdlib>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"

namespace kindred::cli {
namespace {

std::string& CommandNameStorage() {
  static std::string* name = new std::string;
  return *name;
}

// Parses decimal digits, or "0x" and hex digits, into *value; false on
// anything else or on overflow.
bool ParseWholeNumber(std::string_view text, uint64_t* value) {
  int base = 10;
  if (text.size() > 2 && text[0] == '0' && (text[1] == 'x' || text[1] == 'X')) {
    base = 16;
    text.remove_prefix(2);
  }
  if (text.empty()) return false;
  for (char c : text) {
    if (base == 10 ? !absl::ascii_isdigit(c) : !absl::ascii_isxdigit(c)) return false;
  }
  const std::string digits(text);
  errno = 0;
  char* end = nullptr;
  const unsigned long long parsed = std::strtoull(digits.c_str(), &end, base);
  if (errno == ERANGE || end != digits.c_str() + digits.size()) return false;
  *value = parsed;
  return true;
}

std::string LowerFirst(std::string text) {
  if (!text.empty()) text[0] = absl::ascii_tolower(text[0]);
  return text;
}

// The part of a CLI11 message after its first ": " (CLI11 puts the option
// name or a stock phrase before it).
std::string_view After(std::string_view text, std::string_view separator) {
  const size_t at = text.find(separator);
  return at == std::string_view::npos ? text : text.substr(at + separator.size());
}

std::string Reword(const CLI::App* app, const CLI::Error& error) {
  const std::string what = error.what();
  const std::string& command = CommandName();
  const std::string help =
      command.empty() ? "kindred --help" : absl::StrCat("kindred ", command, " --help");
  if (dynamic_cast<const CLI::ExtrasError*>(&error) != nullptr) {
    std::string extras(After(what, ": "));
    if (command.empty()) {
      return absl::StrCat("unknown command \"", extras, "\" (", help, " lists the commands)");
    }
    return absl::StrCat(
        absl::StrContains(extras, ' ') ? "unexpected arguments: " : "unexpected argument: ", extras,
        " (", help, " lists the options)");
  }
  if (dynamic_cast<const CLI::RequiredError*>(&error) != nullptr &&
      absl::StartsWith(what, "A subcommand")) {
    std::vector<std::string> names;
    for (const CLI::App* sub : app->get_subcommands({})) names.push_back(sub->get_name());
    return absl::StrCat("a command is required: ", ListWords(names), " (", help,
                        " says what each does)");
  }
  if (dynamic_cast<const CLI::ConversionError*>(&error) != nullptr &&
      absl::StartsWith(what, "Could not convert: ")) {
    // "Could not convert: --threshold = abc"
    std::string_view rest = After(what, "Could not convert: ");
    const size_t equals = rest.find(" = ");
    if (equals != std::string_view::npos) {
      return absl::StrCat(std::string(rest.substr(0, equals)), ": \"",
                          std::string(rest.substr(equals + 3)), "\" is not a number");
    }
  }
  if (dynamic_cast<const CLI::ArgumentMismatch*>(&error) != nullptr &&
      absl::StrContains(what, " required ") && absl::EndsWith(what, " missing")) {
    // "--threads: 1 required INT missing"
    return absl::StrCat(what.substr(0, what.find(": ")), ": needs a value");
  }
  return LowerFirst(what);
}

}  // namespace

void SetCommandName(std::string_view name) { CommandNameStorage() = std::string(name); }

const std::string& CommandName() { return CommandNameStorage(); }

bool FindCommandName(const CLI::App& app, int argc, char** argv) {
  for (int i = 1; i < argc; ++i) {
    if (argv[i][0] == '-') continue;
    std::vector<std::string> names;
    for (const CLI::App* command : app.get_subcommands({})) {
      if (command->get_name() == argv[i]) {
        SetCommandName(argv[i]);
        return true;
      }
      names.push_back(command->get_name());
    }
    std::fprintf(stderr,
                 "kindred: unknown command \"%s\": expected %s (kindred --help "
                 "says what each does)\n",
                 argv[i], ListWords(names).c_str());
    return false;
  }
  return true;
}

std::string UsagePrefix() {
  const std::string& command = CommandName();
  return command.empty() ? "kindred: " : absl::StrCat("kindred: ", command, ": ");
}

std::string ListWords(const std::vector<std::string>& words) {
  if (words.size() <= 1) return absl::StrJoin(words, "");
  return absl::StrCat(absl::StrJoin(words.begin(), words.end() - 1, ", "), " or ", words.back());
}

CLI::Validator WholeNumber(uint64_t min, uint64_t max) {
  return CLI::Validator(
      [min, max](std::string& value) -> std::string {
        uint64_t number = 0;
        if (!ParseWholeNumber(value, &number) || number < min || number > max) {
          return absl::StrCat("expected a whole number from ", min, " to ", max, ", not \"", value,
                              "\"");
        }
        value = absl::StrCat(number);
        return std::string();
      },
      "");
}

CLI::Validator OneOf(std::vector<std::string> names) {
  return CLI::Validator(
      [names](std::string& value) -> std::string {
        for (const std::string& name : names) {
          if (value == name) return std::string();
        }
        return absl::StrCat("expected ", names.size() > 1 ? "one of " : "", ListWords(names),
                            ", not \"", value, "\"");
      },
      "");
}

std::string ParseErrorMessage(const CLI::App* app, const CLI::Error& error) {
  return absl::StrCat(UsagePrefix(), Reword(app, error), "\n");
}

}  // namespace kindred::cli
