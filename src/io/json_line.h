// Internal: turns one JSON Lines line into a Document's id, text and
// priority, with simdjson's DOM parser (full validation, buffers reused from
// line to line).
//
// Not thread-safe: one parser per reader.
#ifndef KINDRED_IO_JSON_LINE_H_
#define KINDRED_IO_JSON_LINE_H_

#include <algorithm>
#include <bit>
#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"
#include "kindred/corpus.h"

namespace kindred::io {

// Sets *s to `bytes`, growing its buffer to a power of two (at least 1 KiB)
// when it is too small: a buffer reused for texts of varying length then
// reaches its size in a few steps instead of being reallocated for most
// longer texts (reallocations of kilobyte blocks are slow in malloc).
inline void AssignReusing(absl::string_view bytes, std::string* s) {
  if (s->capacity() < bytes.size()) {
    s->reserve(std::max<size_t>(1024, std::bit_ceil(bytes.size())));
  }
  s->assign(bytes.data(), bytes.size());
}

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
