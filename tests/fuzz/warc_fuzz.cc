// Fuzz target: the WARC reader (records, HTTP heads and codings, charsets,
// HTML text) over arbitrary bytes.
//
// Input: one control byte (bit 0: ids from WARC-Record-ID; bit 1: any HTTP
// status; bit 2: a 4 KiB document limit instead of 64 KiB; bit 3: strict),
// then the file's bytes, read with --input-format warc. Besides crashes, it
// checks that every error names the file and stays, that every text is
// valid UTF-8, and that a second reading (Reopen) gives the same documents.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "absl/strings/match.h"
#include "fuzz_util.h"
#include "kindred/corpus.h"
#include "text/utf8.h"

namespace {

bool ReadAll(kindred::CorpusReader* reader, const std::string& path,
             std::vector<kindred::Document>* docs) {
  using kindred::fuzz::Require;
  std::vector<kindred::Document> batch;
  for (;;) {
    absl::StatusOr<size_t> read = reader->ReadBatch(&batch, 4, 1 << 20);
    if (!read.ok()) {
      Require(absl::StrContains(read.status().message(), path), "an error names the file");
      absl::StatusOr<size_t> again = reader->ReadBatch(&batch, 4, 1 << 20);
      Require(!again.ok() && again.status() == read.status(), "an error is sticky");
      return false;
    }
    if (*read == 0) return true;
    for (kindred::Document& doc : batch) docs->push_back(doc);
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using kindred::fuzz::Require;
  if (size == 0) return 0;
  const uint8_t control = data[0];
  const std::string& path = kindred::fuzz::WriteScratch(data + 1, size - 1, ".warc");
  kindred::InputOptions options;
  options.format = kindred::InputFormat::kWarc;
  options.warc.id_source =
      (control & 1) != 0 ? kindred::WarcIdSource::kRecordId : kindred::WarcIdSource::kUri;
  options.warc.any_status = (control & 2) != 0;
  options.max_document_bytes = (control & 4) != 0 ? 4096 : 65536;
  options.warc.strict = (control & 8) != 0;
  options.max_decompressed_bytes = 1 << 24;
  auto reader = kindred::CorpusReader::Open({path}, options);
  Require(reader.ok(), "an existing file opens");
  std::vector<kindred::Document> first;
  const bool complete = ReadAll(reader->get(), path, &first);
  for (const kindred::Document& doc : first) {
    icu::UnicodeString decoded;
    Require(kindred::text_internal::DecodeUtf8(doc.text, &decoded) == 0, "texts are UTF-8");
  }
  if (!complete) return 0;
  auto again = kindred::CorpusReader::Reopen((*reader)->ResolvedInputs(), options);
  Require(again.ok(), "reopens");
  std::vector<kindred::Document> second;
  Require(ReadAll(again->get(), path, &second), "the second reading succeeds");
  Require(second.size() == first.size(), "the second reading has as many documents");
  for (size_t i = 0; i < first.size(); ++i) {
    Require(second[i].id == first[i].id && second[i].text == first[i].text,
            "the second reading gives the same documents");
  }
  return 0;
}
