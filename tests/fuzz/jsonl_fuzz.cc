// Fuzz target: the JSON Lines reader (line splitting, size limit, JSON
// parsing, id / text / priority fields) over arbitrary bytes.
//
// Input: one control byte (bit 0: ids from "@line"; bit 1: a priority field
// "p"; bit 2: a 64-byte document limit instead of 64 KiB), then the file's
// bytes. Besides crashes, it checks that every error names the file and
// stays, that documents come in line order with consecutive ordinals, that
// no text exceeds the limit (plus 2 bytes per replaced
// invalid byte), that batches hold at most max_docs documents,
// and that "@line" ids are "<file>:<line>".
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "fuzz_util.h"
#include "kindred/corpus.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using kindred::fuzz::Require;
  if (size == 0) return 0;
  const uint8_t control = data[0];
  const std::string& path = kindred::fuzz::WriteScratch(data + 1, size - 1, ".jsonl");

  kindred::InputOptions options;
  options.format = kindred::InputFormat::kJsonLines;
  if ((control & 1) != 0) options.id_field = "@line";
  if ((control & 2) != 0) options.priority_field = std::string(1, 'p');
  options.max_document_bytes = (control & 4) != 0 ? 64 : 64 * 1024;
  auto reader = kindred::CorpusReader::Open({path}, options);
  Require(reader.ok(), "an existing file opens");

  std::vector<kindred::Document> batch;
  uint64_t next_ordinal = 0;
  uint64_t last_line = 0;
  bool failed = false;
  for (;;) {
    absl::StatusOr<size_t> read = (*reader)->ReadBatch(&batch, 3, 100);
    if (!read.ok()) {
      Require(absl::StrContains(read.status().message(), path), "an error names the file");
      absl::StatusOr<size_t> again = (*reader)->ReadBatch(&batch, 3, 100);
      Require(!again.ok() && again.status() == read.status(), "an error is sticky");
      failed = true;
      break;
    }
    if (*read == 0) break;
    Require(*read == batch.size() && *read <= 3, "batch holds what ReadBatch says");
    for (const kindred::Document& doc : batch) {
      Require(doc.ordinal == next_ordinal++, "ordinals are consecutive");
      Require(doc.source.line > last_line, "lines ascend");
      last_line = doc.source.line;
      // The limit bounds the line as read; each U+FFFD replacing one
      // invalid byte adds 2 bytes (see corpus.h).
      Require(doc.text.size() <= options.max_document_bytes + 2 * uint64_t{doc.invalid_utf8},
              "text within the limit");
      if ((control & 1) != 0) {
        Require(doc.id == absl::StrCat(path, ":", doc.source.line), "@line ids");
      }
    }
  }
  Require(failed || (*reader)->documents_read() == next_ordinal,
          "documents_read counts the documents returned");
  return 0;
}
