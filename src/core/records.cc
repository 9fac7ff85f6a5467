#include "kindred/records.h"

#include <cstdio>

#include "absl/strings/str_cat.h"

namespace kindred {
namespace {

// Length of the valid UTF-8 sequence at text[i], or 0 when it is invalid.
size_t Utf8SequenceLength(std::string_view text, size_t i) {
  const auto byte = [&](size_t j) { return static_cast<unsigned char>(text[j]); };
  const unsigned char lead = byte(i);
  size_t length;
  uint32_t min;
  if (lead < 0x80) return 1;
  if (lead >= 0xC2 && lead <= 0xDF) {
    length = 2, min = 0x80;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    length = 3, min = 0x800;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    length = 4, min = 0x10000;
  } else {
    return 0;
  }
  if (i + length > text.size()) return 0;
  uint32_t code = lead & (0x7F >> length);
  for (size_t j = 1; j < length; ++j) {
    if ((byte(i + j) & 0xC0) != 0x80) return 0;
    code = (code << 6) | (byte(i + j) & 0x3F);
  }
  if (code < min || code > 0x10FFFF || (code >= 0xD800 && code <= 0xDFFF)) return 0;
  return length;
}

void AppendDelimited(std::string* out, std::string_view text, RecordFormat format) {
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
  out->push_back('"');
  for (size_t i = 0; i < text.size();) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    if (c == '"' || c == '\\') {
      out->push_back('\\');
      out->push_back(static_cast<char>(c));
    } else if (c < 0x20) {
      char escape[8];
      std::snprintf(escape, sizeof(escape), "\\u%04x", c);
      out->append(escape);
    } else if (c >= 0x80) {
      const size_t length = Utf8SequenceLength(text, i);
      if (length == 0) {
        out->append("\xEF\xBF\xBD");  // U+FFFD
        ++i;
        continue;
      }
      out->append(text.substr(i, length));
      i += length;
      continue;
    } else {
      out->push_back(static_cast<char>(c));
    }
    ++i;
  }
  out->push_back('"');
}

void AppendSimilarity(std::string* out, double value) {
  char buffer[32];
  std::snprintf(buffer, sizeof(buffer), "%.6f", value);
  out->append(buffer);
}

RecordWriter::RecordWriter(RecordFormat format, std::vector<std::string> columns, std::string* out)
    : format_(format), columns_(std::move(columns)), out_(out) {
  if (format_ == RecordFormat::kJsonLines) return;
  for (size_t i = 0; i < columns_.size(); ++i) {
    if (i > 0) out_->push_back(format_ == RecordFormat::kTsv ? '\t' : ',');
    out_->append(columns_[i]);
  }
  out_->push_back('\n');
}

void RecordWriter::BeginField() {
  if (format_ == RecordFormat::kJsonLines) {
    out_->append(field_ == 0 ? "{" : ",");
    AppendJsonString(out_, columns_[field_]);
    out_->push_back(':');
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
