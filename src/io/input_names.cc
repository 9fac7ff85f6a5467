// The names of the input enums of corpus.h, and their parsing.
#include "absl/strings/str_cat.h"
#include "core/enum_names.h"
#include "kindred/corpus.h"

namespace kindred {

const char* InputFormatName(InputFormat format) {
  switch (format) {
    case InputFormat::kText:
      return "text";
    case InputFormat::kJsonLines:
      return "jsonl";
    case InputFormat::kWarc:
      return "warc";
    default:
      return "auto";
  }
}

absl::StatusOr<InputFormat> ParseInputFormat(std::string_view name) {
  for (InputFormat format :
       {InputFormat::kAuto, InputFormat::kText, InputFormat::kJsonLines, InputFormat::kWarc}) {
    if (name == InputFormatName(format)) return format;
  }
  return UnknownName("input-format", "auto, text, jsonl or warc", name);
}

const char* WarcIdSourceName(WarcIdSource source) {
  return source == WarcIdSource::kRecordId ? "record-id" : "uri";
}

absl::StatusOr<WarcIdSource> ParseWarcIdSource(std::string_view name) {
  for (WarcIdSource source : {WarcIdSource::kUri, WarcIdSource::kRecordId}) {
    if (name == WarcIdSourceName(source)) return source;
  }
  return UnknownName("warc-id", "uri or record-id", name);
}

}  // namespace kindred
