// RecordWriter's fields beyond strings and counts (booleans, decimals, number
// lists) and its nested JSON lists (records.h).
#include <cstdio>

#include "absl/strings/str_cat.h"
#include "kindred/records.h"

namespace kindred {
namespace {

void AppendNumbers(std::string* out, absl::Span<const uint64_t> values, char separator) {
  for (size_t i = 0; i < values.size(); ++i) {
    if (i > 0) out->push_back(separator);
    absl::StrAppend(out, values[i]);
  }
}

void AppendFormatted(std::string* out, const char* format, int decimals, double value) {
  char buffer[64];
  const int n = decimals < 0 ? std::snprintf(buffer, sizeof(buffer), format, value)
                             : std::snprintf(buffer, sizeof(buffer), format, decimals, value);
  if (n > 0 && static_cast<size_t>(n) < sizeof(buffer)) {
    out->append(buffer, static_cast<size_t>(n));
    return;
  }
  std::string wide(static_cast<size_t>(n > 0 ? n : 0) + 1, '\0');
  const int m = decimals < 0 ? std::snprintf(wide.data(), wide.size(), format, value)
                             : std::snprintf(wide.data(), wide.size(), format, decimals, value);
  wide.resize(static_cast<size_t>(m > 0 ? m : 0));
  out->append(wide);
}

}  // namespace

void RecordWriter::Bool(bool value) {
  BeginField();
  out_->append(value ? "true" : "false");
}

void RecordWriter::Fixed(double value, int decimals) {
  BeginField();
  AppendFormatted(out_, "%.*f", decimals, value);
}

void RecordWriter::Real(double value) {
  BeginField();
  AppendFormatted(out_, "%g", -1, value);
}

void RecordWriter::NumberList(absl::Span<const uint64_t> values) {
  BeginField();
  if (format_ != RecordFormat::kJsonLines) {
    AppendNumbers(out_, values, ' ');
    return;
  }
  out_->push_back('[');
  AppendNumbers(out_, values, ',');
  out_->push_back(']');
}

void RecordWriter::BeginList() {
  BeginField();
  out_->push_back('[');
  list_started_ = false;
}

void RecordWriter::NextItem() {
  if (list_started_) out_->push_back(',');
  list_started_ = true;
}

RecordWriter RecordWriter::ListItem(std::vector<std::string> columns) {
  NextItem();
  return RecordWriter(RecordFormat::kJsonLines, std::move(columns), out_);
}

void RecordWriter::NumberItem(absl::Span<const uint64_t> values) {
  NextItem();
  out_->push_back('[');
  AppendNumbers(out_, values, ',');
  out_->push_back(']');
}

void RecordWriter::EndList() {
  out_->push_back(']');
  list_started_ = false;
}

void RecordWriter::EndItem() {
  out_->push_back('}');
  field_ = 0;
}

}  // namespace kindred
