// Internal: turns one JSON Lines line into a Document's id, text and
// priority, with simdjson's DOM parser (full validation, buffers reused from
// line to line).
//
// Not thread-safe: one parser per reader.
#ifndef KINDRED_IO_JSON_LINE_H_
#define KINDRED_IO_JSON_LINE_H_

#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"
#include "kindred/corpus.h"

namespace kindred::io {

// The id_field value that makes ids "<file>:<line>".
inline constexpr absl::string_view kLineNumberId = "@line";

class JsonLineParser {
 public:
  // Borrows nothing: the field names are copied.
  explicit JsonLineParser(const InputOptions& options);
  ~JsonLineParser();

  // Parses `line` (one JSON object) into doc->id, doc->text and the
  // priority. "path:line_number" starts every message. When the id field
  // is "@line", doc->id is left for the caller to set.
  absl::Status Parse(absl::string_view line, absl::string_view path, uint64_t line_number,
                     Document* doc);

 private:
  struct State;
  std::unique_ptr<State> state_;
  std::string id_field_;
  std::string text_field_;
  std::string priority_field_;
  bool id_from_line_;
};

}  // namespace kindred::io

#endif  // KINDRED_IO_JSON_LINE_H_
