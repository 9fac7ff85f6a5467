#include "kindred/records.h"

#include <charconv>
#include <cstdio>
#include <system_error>

#include "absl/strings/str_cat.h"
#include "kindred/text.h"

namespace kindred {
namespace {

// `text` as well-formed UTF-8: itself when it is, else its repair by
// RepairUtf8 (one U+FFFD per maximal subpart, as the text layer decodes
// inputs) held in *storage. Every output format goes through this one repair.
std::string_view WellFormed(std::string_view text, std::string* storage) {
  if (IsAscii(text)) return text;
  uint32_t replaced = 0;
  *storage = RepairUtf8(text, &replaced);
  return replaced == 0 ? text : std::string_view(*storage);
}

void AppendDelimitedWellFormed(std::string* out, std::string_view text, RecordFormat format) {
  if (format == RecordFormat::kTsv) {
    for (char c : text) {
      switch (c) {
        case '\t':
          out->append("\\t");
          break;
        case '\n':
          out->append("\\n");
          break;
        case '\r':
          out->append("\\r");
          break;
        case '\\':
          out->append("\\\\");
          break;
        default:
          out->push_back(c);
      }
    }
    return;
  }
  if (text.find_first_of(",\"\r\n") == std::string_view::npos) {
    out->append(text);
    return;
  }
  out->push_back('"');
  for (char c : text) {
    if (c == '"') out->push_back('"');
    out->push_back(c);
  }
  out->push_back('"');
}

void AppendDelimited(std::string* out, std::string_view text, RecordFormat format) {
  std::string storage;
  AppendDelimitedWellFormed(out, WellFormed(text, &storage), format);
}

}  // namespace

absl::StatusOr<RecordFormat> ParseRecordFormat(std::string_view name) {
  if (name == "jsonl") return RecordFormat::kJsonLines;
  if (name == "tsv") return RecordFormat::kTsv;
  if (name == "csv") return RecordFormat::kCsv;
  return absl::InvalidArgumentError(absl::StrCat("unknown output format \"", std::string(name),
                                                 "\" (expected jsonl, tsv or csv)"));
}

const char* RecordFormatSuffix(RecordFormat format) {
  switch (format) {
    case RecordFormat::kJsonLines:
      return "jsonl";
    case RecordFormat::kTsv:
      return "tsv";
    case RecordFormat::kCsv:
      return "csv";
  }
  return "?";
}

void AppendJsonString(std::string* out, std::string_view text) {
  std::string storage;
  text = WellFormed(text, &storage);
  out->push_back('"');
  size_t plain = 0;  // the first byte not yet appended
  for (size_t i = 0; i < text.size(); ++i) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    if (c >= 0x20 && c != '"' && c != '\\') continue;
    out->append(text.data() + plain, i - plain);
    plain = i + 1;
    if (c >= 0x20) {
      out->push_back('\\');
      out->push_back(static_cast<char>(c));
    } else {
      static constexpr char kHex[] = "0123456789abcdef";
      const char escape[] = {'\\', 'u', '0', '0', kHex[c >> 4], kHex[c & 15]};
      out->append(escape, sizeof(escape));
    }
  }
  out->append(text.data() + plain, text.size() - plain);
  out->push_back('"');
}

void AppendSimilarity(std::string* out, double value) {
  // std::to_chars with a precision formats as printf's "%.6f" does, exactly
  // rounded, several times faster.
  char buffer[32];
  const std::to_chars_result end =
      std::to_chars(buffer, buffer + sizeof(buffer), value, std::chars_format::fixed, 6);
  if (end.ec == std::errc()) {
    out->append(buffer, end.ptr);
    return;
  }
  std::snprintf(buffer, sizeof(buffer), "%.6f", value);
  out->append(buffer);
}

RecordWriter::RecordWriter(RecordFormat format, std::vector<std::string> columns, std::string* out)
    : RecordWriter(format, std::move(columns), out, /*header=*/true) {}

RecordWriter RecordWriter::Continuing(RecordFormat format, std::vector<std::string> columns,
                                      std::string* out) {
  return RecordWriter(format, std::move(columns), out, /*header=*/false);
}

RecordWriter::RecordWriter(RecordFormat format, std::vector<std::string> columns, std::string* out,
                           bool header)
    : format_(format), columns_(std::move(columns)), out_(out) {
  if (format_ == RecordFormat::kJsonLines) {
    keys_.reserve(columns_.size());
    for (size_t i = 0; i < columns_.size(); ++i) {
      std::string key(i == 0 ? "{" : ",");
      AppendJsonString(&key, columns_[i]);
      key.push_back(':');
      keys_.push_back(std::move(key));
    }
    return;
  }
  if (!header) return;
  for (size_t i = 0; i < columns_.size(); ++i) {
    if (i > 0) out_->push_back(format_ == RecordFormat::kTsv ? '\t' : ',');
    out_->append(columns_[i]);
  }
  out_->push_back('\n');
}

void RecordWriter::BeginField() {
  if (format_ == RecordFormat::kJsonLines) {
    out_->append(keys_[field_]);
  } else if (field_ > 0) {
    out_->push_back(format_ == RecordFormat::kTsv ? '\t' : ',');
  }
  ++field_;
}

void RecordWriter::String(std::string_view value) {
  BeginField();
  if (format_ == RecordFormat::kJsonLines) {
    AppendJsonString(out_, value);
  } else {
    AppendDelimited(out_, value, format_);
  }
}

void RecordWriter::Number(uint64_t value) {
  BeginField();
  absl::StrAppend(out_, value);
}

void RecordWriter::Similarity(double value) {
  BeginField();
  AppendSimilarity(out_, value);
}

void RecordWriter::Null() {
  BeginField();
  if (format_ == RecordFormat::kJsonLines) out_->append("null");
}

void RecordWriter::StringList(absl::Span<const std::string_view> values) {
  BeginField();
  if (format_ == RecordFormat::kJsonLines) {
    out_->push_back('[');
    for (size_t i = 0; i < values.size(); ++i) {
      if (i > 0) out_->push_back(',');
      AppendJsonString(out_, values[i]);
    }
    out_->push_back(']');
    return;
  }
  std::string joined;
  for (size_t i = 0; i < values.size(); ++i) {
    if (i > 0) joined.push_back(' ');
    joined.append(values[i]);
  }
  AppendDelimited(out_, joined, format_);
}

void RecordWriter::EndRow() {
  if (format_ == RecordFormat::kJsonLines) out_->push_back('}');
  out_->push_back('\n');
  field_ = 0;
}

}  // namespace kindred
