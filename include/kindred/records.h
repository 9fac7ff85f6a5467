// kindred: output records (pairs, groups, keep/drop decisions) as JSON Lines,
// TSV or CSV.
//
// The field names and their meaning are documented in README.md ("Output
// fields"); keep the two in step. Numbers are printed with fixed precision so
// output is byte-identical across runs and machines.
//
// RecordWriter appends to a caller-owned string; not thread-safe (one writer
// per output).
#ifndef KINDRED_RECORDS_H_
#define KINDRED_RECORDS_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/groups.h"

namespace kindred {

enum class RecordFormat : uint8_t { kJsonLines, kTsv, kCsv };

// Parses "jsonl", "tsv", "csv".
absl::StatusOr<RecordFormat> ParseRecordFormat(std::string_view name);
// "jsonl", "tsv", "csv": the file suffix of each format.
const char* RecordFormatSuffix(RecordFormat format);

// Appends `text` as a JSON string literal (quotes included). Ill-formed
// UTF-8 is repaired by RepairUtf8 (kindred/text.h: one U+FFFD per maximal
// subpart), as every text field of every format is (RecordWriter), so the
// output is always valid JSON and an id reads the same in all formats.
void AppendJsonString(std::string* out, std::string_view text);
// Appends a similarity with 6 decimals ("0.912345").
void AppendSimilarity(std::string* out, double value);

// One row of a table with named columns, written in the chosen format: a JSON
// object per line, or a header line then one line per row for TSV/CSV (TSV
// escapes tab, newline, CR and backslash as \t \n \r \\; CSV quotes fields per
// RFC 4180).
class RecordWriter {
 public:
  // `columns` are the field names, in order. The header (TSV/CSV) is
  // appended at once.
  RecordWriter(RecordFormat format, std::vector<std::string> columns, std::string* out);
  // A writer of rows that continue a table whose header is already written
  // (rows formatted apart, to be joined after it): no header is appended.
  static RecordWriter Continuing(RecordFormat format, std::vector<std::string> columns,
                                 std::string* out);

  // Fields of the current row, in column order. A row holds exactly one
  // field per column; EndRow() finishes it.
  void String(std::string_view value);
  void Number(uint64_t value);
  void Similarity(double value);
  void Null();  // JSON null, empty TSV/CSV field
  // A list of strings: a JSON array; in TSV/CSV the items joined by a space,
  // which cannot be split back when an item holds a space: TSV/CSV records
  // of id lists write one row per item instead (see WriteGroupRecords).
  void StringList(absl::Span<const std::string_view> values);
  // true or false.
  void Bool(bool value);
  // A number with `decimals` digits after the point ("%.*f").
  void Fixed(double value, int decimals);
  // A number in the shortest of fixed and exponent form, 6 significant
  // digits ("%g": 0.8, 1e-05).
  void Real(double value);
  // A list of numbers: a JSON array; in TSV/CSV the numbers joined by a
  // space.
  void NumberList(absl::Span<const uint64_t> values);
  void EndRow();

  // Lists of lists and of nested records, JSON Lines only (a TSV or CSV row
  // holds no nesting; a command offers them in JSON only). BeginList opens a
  // field holding a JSON array; each ListItem or NumberItem adds one element
  // to it; EndList closes it.
  void BeginList();
  // An element that is a nested record with `columns`: fill its fields with
  // the writer returned (which appends to the same string), then call its
  // EndItem() (no line break) before the next element.
  RecordWriter ListItem(std::vector<std::string> columns);
  // An element that is a list of numbers.
  void NumberItem(absl::Span<const uint64_t> values);
  void EndList();
  // Ends a nested record of ListItem.
  void EndItem();

 private:
  RecordWriter(RecordFormat format, std::vector<std::string> columns, std::string* out,
               bool header);
  void BeginField();
  void NextItem();

  RecordFormat format_;
  std::vector<std::string> columns_;
  // JSON Lines: what opens each field, its name quoted ("{\"a\":", ",\"b\":").
  std::vector<std::string> keys_;
  std::string* out_;
  size_t field_ = 0;
  bool list_started_ = false;  // an element was added to the open list
};

// Record text in consecutive parts (formatted apart, on several threads):
// the parts joined are the records. A writer can append them one by one and
// spare the join.
using RecordParts = std::vector<std::string>;
// Appends the parts, in order, to *out.
void JoinParts(const RecordParts& parts, std::string* out);

// The three record kinds of a sweep, appended to *out (or as parts to
// *parts). `ids` maps document index to id. `threads` > 1 formats the rows
// in parts on that many threads (the calling thread among them); the bytes
// are the same for any count.
void WritePairRecords(RecordFormat format, absl::Span<const ScoredPair> pairs,
                      absl::Span<const std::string> ids, std::string* out, int threads = 1);
void WritePairRecords(RecordFormat format, absl::Span<const ScoredPair> pairs,
                      absl::Span<const std::string> ids, RecordParts* parts, int threads = 1);
// Groups: JSON Lines writes one record per group with the drops as an array;
// TSV and CSV write one row per drop (columns group, size, keeper, drop,
// policy), so every id is a field of its own and any id round-trips. Groups
// made around keepers (Grouping::kKeepers) carry a last field, "grouping";
// groups of connected components (the default) do not.
void WriteGroupRecords(RecordFormat format, absl::Span<const Group> groups,
                       absl::Span<const std::string> ids, KeepPolicy policy, std::string* out,
                       Grouping grouping = Grouping::kComponents, int threads = 1);
void WriteGroupRecords(RecordFormat format, absl::Span<const Group> groups,
                       absl::Span<const std::string> ids, KeepPolicy policy, RecordParts* parts,
                       Grouping grouping = Grouping::kComponents, int threads = 1);
// One decision per document that belongs to a group (keep for its keeper,
// drop for the others), in document order. Documents in no group are kept and
// not listed. `empty` marks documents with no shingles, which are listed as
// kept with that reason. With the priority policy and `facts` given (one per
// document), the reason shows the priority values compared. Around keepers
// (Grouping::kKeepers) the reason of a drop gives its Jaccard similarity
// with its keeper, and a last field "grouping" is added, as in the groups.
void WriteDecisionRecords(RecordFormat format, absl::Span<const Group> groups,
                          absl::Span<const ScoredPair> pairs, absl::Span<const std::string> ids,
                          absl::Span<const uint8_t> empty, KeepPolicy policy, std::string* out,
                          absl::Span<const KeepFacts> facts = {},
                          Grouping grouping = Grouping::kComponents, int threads = 1);
void WriteDecisionRecords(RecordFormat format, absl::Span<const Group> groups,
                          absl::Span<const ScoredPair> pairs, absl::Span<const std::string> ids,
                          absl::Span<const uint8_t> empty, KeepPolicy policy, RecordParts* parts,
                          absl::Span<const KeepFacts> facts = {},
                          Grouping grouping = Grouping::kComponents, int threads = 1);

}  // namespace kindred

#endif  // KINDRED_RECORDS_H_
