#include "io/json_line.h"

#include <simdjson.h>

#include <cstring>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "text/utf8.h"

namespace kindred::io {

struct JsonLineParser::State {
  simdjson::dom::parser parser;
  std::string padded;    // the line followed by SIMDJSON_PADDING readable bytes
  std::string repaired;  // a line with invalid UTF-8 replaced by U+FFFD
};

JsonLineParser::JsonLineParser(const InputOptions& options)
    : state_(std::make_unique<State>()),
      id_field_(options.id_field),
      text_field_(options.text_field),
      priority_field_(options.priority_field),
      id_from_line_(options.id_field == kLineNumberId) {}

JsonLineParser::~JsonLineParser() = default;

namespace {

absl::Status FieldError(absl::string_view where, absl::string_view field, absl::string_view what) {
  return absl::InvalidArgumentError(absl::StrFormat("%s: field \"%s\" %s", where, field, what));
}

// Renders a string or integer id into *id; false when it is neither.
bool ReadId(simdjson::dom::element value, std::string* id) {
  switch (value.type()) {
    case simdjson::dom::element_type::STRING:
      id->assign(value.get_string().value_unsafe());
      return true;
    case simdjson::dom::element_type::INT64:
      *id = absl::StrCat(value.get_int64().value_unsafe());
      return true;
    case simdjson::dom::element_type::UINT64:
      *id = absl::StrCat(value.get_uint64().value_unsafe());
      return true;
    default:
      return false;
  }
}

// Copies `text` into the reusable padded buffer and parses it.
simdjson::error_code ParseRoot(absl::string_view text, std::string* padded,
                               simdjson::dom::parser* parser, simdjson::dom::element* root) {
  if (padded->size() < text.size() + simdjson::SIMDJSON_PADDING) {
    padded->resize(text.size() + simdjson::SIMDJSON_PADDING);
  }
  std::memcpy(padded->data(), text.data(), text.size());
  std::memset(padded->data() + text.size(), ' ', simdjson::SIMDJSON_PADDING);
  return parser->parse(padded->data(), text.size(), false).get(*root);
}

// Parses `line`. Text is UTF-8 with replacement (ill-formed sequences
// become U+FFFD and are counted in *invalid_utf8), in JSON Lines as in text
// files: a crawled line with a broken byte is read, not rejected.
simdjson::error_code ParseRepairing(absl::string_view line, std::string* padded,
                                    std::string* repaired, simdjson::dom::parser* parser,
                                    simdjson::dom::element* root, uint32_t* invalid_utf8) {
  *invalid_utf8 = 0;
  simdjson::error_code error = ParseRoot(line, padded, parser, root);
  if (error != simdjson::UTF8_ERROR) return error;
  icu::UnicodeString decoded;
  *invalid_utf8 = text_internal::DecodeUtf8(std::string_view(line.data(), line.size()), &decoded);
  repaired->clear();
  text_internal::AppendUtf8(decoded.getBuffer(), 0, decoded.length(), repaired);
  return ParseRoot(*repaired, padded, parser, root);
}

}  // namespace

absl::Status JsonLineParser::Parse(absl::string_view line, absl::string_view path,
                                   uint64_t line_number, Document* doc) {
  // "file:line", made only for a message (not for every line).
  const auto where = [&] { return absl::StrCat(path, ":", line_number); };
  simdjson::dom::element root;
  const simdjson::error_code error = ParseRepairing(
      line, &state_->padded, &state_->repaired, &state_->parser, &root, &doc->invalid_utf8);
  if (error) {
    return absl::InvalidArgumentError(
        absl::StrCat(where(), ": invalid JSON: ", simdjson::error_message(error)));
  }
  simdjson::dom::object object;
  if (root.get(object) != simdjson::SUCCESS) {
    return absl::InvalidArgumentError(absl::StrCat(where(), ": not a JSON object"));
  }
  doc->priority = 0;
  doc->has_priority = false;
  bool has_id = id_from_line_, has_text = false;
  for (simdjson::dom::key_value_pair field : object) {
    if (field.key == text_field_) {
      if (!field.value.is_string()) return FieldError(where(), text_field_, "is not a string");
      const std::string_view text = field.value.get_string().value_unsafe();
      AssignReusing(absl::string_view(text.data(), text.size()), &doc->text);
      has_text = true;
    }
    if (!id_from_line_ && field.key == id_field_) {
      if (!ReadId(field.value, &doc->id)) {
        return FieldError(where(), id_field_, "is not a string or an integer");
      }
      has_id = true;
    }
    if (!priority_field_.empty() && field.key == priority_field_) {
      if (!field.value.is_number()) return FieldError(where(), priority_field_, "is not a number");
      doc->priority = field.value.get_double().value_unsafe();
      doc->has_priority = true;
    }
  }
  if (!has_text) {
    return absl::InvalidArgumentError(
        absl::StrFormat("%s: missing field \"%s\"", where(), text_field_));
  }
  if (!has_id) {
    return absl::InvalidArgumentError(
        absl::StrFormat("%s: missing field \"%s\"", where(), id_field_));
  }
  return absl::OkStatus();
}

}  // namespace kindred::io
