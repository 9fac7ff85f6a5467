#include "kindred/labels.h"

#include <simdjson.h>

#include <algorithm>
#include <utility>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/ascii.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"

namespace kindred {
namespace {

std::string Where(std::string_view name, uint64_t line) {
  return absl::StrCat(std::string(name), ":", line);
}

absl::Status LineError(std::string_view name, uint64_t line, absl::string_view what) {
  return absl::InvalidArgumentError(absl::StrCat(Where(name, line), ": ", what));
}

// Splits `content` into lines without their "\n" or "\r\n".
std::vector<std::string_view> SplitLines(std::string_view content) {
  std::vector<std::string_view> lines;
  size_t start = 0;
  while (start < content.size()) {
    size_t end = content.find('\n', start);
    if (end == std::string_view::npos) end = content.size();
    std::string_view line = content.substr(start, end - start);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    lines.push_back(line);
    start = end + 1;
  }
  return lines;
}

bool IsBlank(std::string_view line) {
  return std::all_of(line.begin(), line.end(),
                     [](char c) { return c == ' ' || c == '\t' || c == '\r'; });
}

// Fields of one CSV line per RFC 4180 (quotes may not span lines here).
absl::StatusOr<std::vector<std::string>> SplitCsv(std::string_view line) {
  std::vector<std::string> fields(1);
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted) {
      if (c != '"') {
        fields.back().push_back(c);
      } else if (i + 1 < line.size() && line[i + 1] == '"') {
        fields.back().push_back('"');
        ++i;
      } else {
        quoted = false;
      }
    } else if (c == '"') {
      quoted = true;
    } else if (c == ',') {
      fields.emplace_back();
    } else {
      fields.back().push_back(c);
    }
  }
  if (quoted) return absl::InvalidArgumentError("unterminated quoted field");
  return fields;
}

std::vector<std::string> SplitTsv(std::string_view line) {
  std::vector<std::string> fields(1);
  for (char c : line) {
    if (c == '\t') {
      fields.emplace_back();
    } else {
      fields.back().push_back(c);
    }
  }
  return fields;
}

absl::Status ParseDelimited(const std::vector<std::string_view>& lines, bool tsv,
                            std::string_view name, std::vector<LabelledPair>* out) {
  bool first = true;
  for (size_t i = 0; i < lines.size(); ++i) {
    if (IsBlank(lines[i])) continue;
    const uint64_t line = i + 1;
    std::vector<std::string> fields;
    if (tsv) {
      fields = SplitTsv(lines[i]);
    } else {
      absl::StatusOr<std::vector<std::string>> csv = SplitCsv(lines[i]);
      if (!csv.ok()) return LineError(name, line, csv.status().message());
      fields = std::move(*csv);
    }
    if (fields.size() != 3) {
      return LineError(name, line,
                       absl::StrFormat("expected 3 %s-separated columns (a, b, label), found %d",
                                       tsv ? "tab" : "comma", fields.size()));
    }
    absl::StatusOr<bool> label = ParseLabel(fields[2]);
    const bool header = first && !label.ok();
    first = false;
    if (header) continue;
    if (!label.ok()) return LineError(name, line, label.status().message());
    out->push_back({std::move(fields[0]), std::move(fields[1]), *label, line});
  }
  return absl::OkStatus();
}

absl::StatusOr<std::string> JsonId(simdjson::dom::element value) {
  switch (value.type()) {
    case simdjson::dom::element_type::STRING:
      return std::string(value.get_string().value_unsafe());
    case simdjson::dom::element_type::INT64:
      return absl::StrCat(value.get_int64().value_unsafe());
    case simdjson::dom::element_type::UINT64:
      return absl::StrCat(value.get_uint64().value_unsafe());
    default:
      return absl::InvalidArgumentError("is not a string or an integer");
  }
}

absl::StatusOr<bool> JsonLabel(simdjson::dom::element value) {
  switch (value.type()) {
    case simdjson::dom::element_type::STRING:
      return ParseLabel(value.get_string().value_unsafe());
    case simdjson::dom::element_type::BOOL:
      return value.get_bool().value_unsafe();
    case simdjson::dom::element_type::INT64:
    case simdjson::dom::element_type::UINT64: {
      int64_t number = -1;
      if (value.get_int64().get(number) == simdjson::SUCCESS && (number == 0 || number == 1)) {
        return number == 1;
      }
      break;
    }
    default:
      break;
  }
  return absl::InvalidArgumentError("is not a label (a spelling, true/false or 1/0)");
}

absl::StatusOr<LabelledPair> ParseJsonLine(simdjson::dom::parser& parser, std::string_view text) {
  simdjson::dom::element root;
  if (auto error = parser.parse(text.data(), text.size()).get(root)) {
    return absl::InvalidArgumentError(
        absl::StrCat("invalid JSON: ", simdjson::error_message(error)));
  }
  if (!root.is_object()) return absl::InvalidArgumentError("not a JSON object");
  LabelledPair pair;
  for (const char* field : {"a", "b", "label"}) {
    simdjson::dom::element value;
    if (root[field].get(value) != simdjson::SUCCESS) {
      return absl::InvalidArgumentError(absl::StrFormat("missing field \"%s\"", field));
    }
    absl::Status status;
    if (field[0] == 'l') {
      absl::StatusOr<bool> label = JsonLabel(value);
      if (label.ok()) pair.duplicate = *label;
      status = label.status();
    } else {
      absl::StatusOr<std::string> id = JsonId(value);
      if (id.ok()) (field[0] == 'a' ? pair.a : pair.b) = std::move(*id);
      status = id.status();
    }
    if (!status.ok()) {
      return absl::InvalidArgumentError(
          absl::StrFormat("field \"%s\" %s", field, std::string(status.message())));
    }
  }
  return pair;
}

absl::Status ParseJsonLines(const std::vector<std::string_view>& lines, std::string_view name,
                            std::vector<LabelledPair>* out) {
  simdjson::dom::parser parser;
  for (size_t i = 0; i < lines.size(); ++i) {
    if (IsBlank(lines[i])) continue;
    absl::StatusOr<LabelledPair> pair = ParseJsonLine(parser, lines[i]);
    if (!pair.ok()) return LineError(name, i + 1, pair.status().message());
    pair->line = i + 1;
    out->push_back(std::move(*pair));
  }
  return absl::OkStatus();
}

// Rejects self-pairs and repeated pairs.
absl::Status CheckPairs(const std::vector<LabelledPair>& pairs, std::string_view name) {
  absl::flat_hash_map<std::pair<std::string, std::string>, uint64_t> seen;
  for (const LabelledPair& pair : pairs) {
    if (pair.a == pair.b) {
      return LineError(name, pair.line, absl::StrCat("pairs \"", pair.a, "\" with itself"));
    }
    auto key = pair.a < pair.b ? std::pair(pair.a, pair.b) : std::pair(pair.b, pair.a);
    auto [it, inserted] = seen.emplace(std::move(key), pair.line);
    if (!inserted) {
      return LineError(name, pair.line, absl::StrCat("the pair repeats line ", it->second));
    }
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<bool> ParseLabel(std::string_view word) {
  const std::string lower = absl::AsciiStrToLower(
      absl::StripAsciiWhitespace(absl::string_view(word.data(), word.size())));
  for (const char* yes : {"duplicate", "dup", "yes", "true", "1"}) {
    if (lower == yes) return true;
  }
  for (const char* no : {"distinct", "different", "not-duplicate", "no", "false", "0"}) {
    if (lower == no) return false;
  }
  return absl::InvalidArgumentError(absl::StrCat("unknown label \"", std::string(word), "\""));
}

absl::StatusOr<std::vector<LabelledPair>> ParseLabels(std::string_view content,
                                                      std::string_view name) {
  const std::vector<std::string_view> lines = SplitLines(content);
  std::vector<LabelledPair> pairs;
  const size_t first =
      std::find_if(lines.begin(), lines.end(), [](std::string_view l) { return !IsBlank(l); }) -
      lines.begin();
  absl::Status status;
  if (first < lines.size()) {
    std::string_view head = lines[first];
    head.remove_prefix(std::min(head.find_first_not_of(" \t"), head.size()));
    if (!head.empty() && head.front() == '{') {
      status = ParseJsonLines(lines, name, &pairs);
    } else {
      status =
          ParseDelimited(lines, lines[first].find('\t') != std::string_view::npos, name, &pairs);
    }
  }
  if (!status.ok()) return status;
  if (absl::Status check = CheckPairs(pairs, name); !check.ok()) return check;
  return pairs;
}

absl::StatusOr<std::vector<LabelledPair>> ReadLabels(const std::string& path, FileSystem* fs) {
  if (fs == nullptr) fs = DefaultFileSystem();
  absl::StatusOr<std::unique_ptr<ReadableFile>> file = fs->OpenRead(path);
  if (!file.ok()) return absl::NotFoundError(absl::StrCat(path, ": cannot open the labels file"));
  absl::StatusOr<std::string> content = ReadToEnd(**file);
  if (!content.ok()) return BadInput(absl::StrCat(path, ": read error"));
  return ParseLabels(*content, path);
}

absl::StatusOr<std::vector<ResolvedPair>> ResolveLabels(absl::Span<const LabelledPair> pairs,
                                                        absl::Span<const std::string> ids,
                                                        std::string_view labels_name,
                                                        bool skip_unknown,
                                                        std::vector<std::string>* warnings) {
  absl::flat_hash_map<std::string_view, uint32_t> index;
  for (size_t doc = 0; doc < ids.size(); ++doc) index.emplace(ids[doc], doc);
  std::vector<ResolvedPair> resolved;
  for (size_t i = 0; i < pairs.size(); ++i) {
    const LabelledPair& pair = pairs[i];
    auto a = index.find(pair.a);
    auto b = index.find(pair.b);
    if (a == index.end() || b == index.end()) {
      const std::string& missing = a == index.end() ? pair.a : pair.b;
      const std::string message = absl::StrCat(Where(labels_name, pair.line), ": id \"", missing,
                                               "\" is not in the corpus");
      if (!skip_unknown) return absl::InvalidArgumentError(message);
      warnings->push_back(absl::StrCat(message, "; pair skipped"));
      continue;
    }
    resolved.push_back({a->second, b->second, pair.duplicate, static_cast<uint32_t>(i)});
  }
  return resolved;
}

}  // namespace kindred
