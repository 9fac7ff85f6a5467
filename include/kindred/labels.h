// kindred: a labelled sample of document pairs, as `kindred tune` reads it.
//
// A labels file names pairs of documents by id and says whether an editor
// judged them duplicates. Three layouts are accepted, decided by content:
//   - JSON Lines, when the first non-blank byte is '{': one object per line
//     with fields "a" and "b" (strings or integers, integers rendered in
//     decimal) and "label" (a string spelling below, true/false, or 1/0).
//   - TSV, when the first non-blank line holds a tab: three tab-separated
//     columns a, b, label.
//   - CSV otherwise: three comma-separated columns (RFC 4180 quoting: a
//     field in double quotes may hold commas, and "" stands for one quote).
// In TSV and CSV the first line is a header, and skipped, when its third
// column is not a label spelling (e.g. "a<TAB>b<TAB>label"). Blank lines are
// skipped everywhere; lines may end in "\n" or "\r\n".
//
// Label spellings (case-insensitive, surrounding spaces ignored):
//   duplicate: duplicate, dup, yes, true, 1
//   distinct:  distinct, different, not-duplicate, no, false, 0
//
// Errors are InvalidArgument and name the file and line: "labels.tsv:7:
// unknown label \"maybe\"". A pair of a document with itself, and a pair
// listed twice (in either order), are errors too.
//
// Pure functions; thread-safe.
#ifndef KINDRED_LABELS_H_
#define KINDRED_LABELS_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/file_io.h"

namespace kindred {

// One labelled pair as written in the file.
struct LabelledPair {
  std::string a;
  std::string b;
  bool duplicate = false;
  uint64_t line = 0;  // 1-based line in the labels file
};

// Parses one label spelling (see the file comment): true for duplicate,
// false for distinct; InvalidArgument for anything else.
absl::StatusOr<bool> ParseLabel(std::string_view word);

// Parses the content of a labels file. `name` (the file's path) starts every
// error message.
absl::StatusOr<std::vector<LabelledPair>> ParseLabels(std::string_view content,
                                                      std::string_view name);

// Reads and parses the labels file at `path` (plain text; NotFound when it
// cannot be opened, BadInput "<path>: read error" when it cannot be read to
// its end) through `fs` (null: DefaultFileSystem()).
absl::StatusOr<std::vector<LabelledPair>> ReadLabels(const std::string& path,
                                                     FileSystem* fs = nullptr);

// A labelled pair whose ids were found in a corpus: documents are the dense
// indices 0..n-1 of the corpus.
struct ResolvedPair {
  uint32_t a = 0;
  uint32_t b = 0;
  bool duplicate = false;
  uint32_t label = 0;  // index into the list of LabelledPair it came from
};

// Maps the ids of `pairs` to indices in `ids` (the corpus's ids, in
// document order). An id that is not in the corpus is an InvalidArgument
// error naming `labels_name`, the line and the id, unless `skip_unknown`:
// then the pair is left out and one warning per such pair is appended to
// *warnings (which must not be null in that case).
absl::StatusOr<std::vector<ResolvedPair>> ResolveLabels(absl::Span<const LabelledPair> pairs,
                                                        absl::Span<const std::string> ids,
                                                        std::string_view labels_name,
                                                        bool skip_unknown,
                                                        std::vector<std::string>* warnings);

}  // namespace kindred

#endif  // KINDRED_LABELS_H_
