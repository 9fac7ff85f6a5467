// Internal: which WARC records are documents, and their ids and texts.
//
// Documents are:
//   - `response` records whose block is an HTTP response (Content-Type
//     application/http) with a 2xx status (any status with
//     WarcOptions::any_status) and an HTML (text/html,
//     application/xhtml+xml) or plain text (text/plain) payload;
//   - `resource` records whose Content-Type is one of those;
//   - `conversion` records (extracted text, as in WET files) whose
//     Content-Type is text/plain or missing.
// Every other record is not a document and is counted by kind and reason:
// warcinfo, request, metadata, revisit and continuation records; responses
// that are not HTTP, have another status or another payload type; and
// records whose block is larger than the document limit plus 1 MiB for the
// HTTP head (an error with WarcOptions::strict). The decision reads only the
// record's headers and its HTTP head, so both readings of a corpus make the
// same documents.
//
// The id is WARC-Target-URI (angle brackets of WARC 1.0 writers removed), or
// WARC-Record-ID with WarcOptions::id_source; a record without the
// chosen field uses the other one.
//
// The text: HTTP transfer and content codings removed (a payload that does
// not decode is counted and gives an empty text; one that decodes to more
// than the document limit is an error), converted to UTF-8 (io/charset.h),
// and for HTML turned into text (io/html_text.h). A WARC-Payload-Digest
// that does not match the payload is counted (an error with strict).
//
// Not thread-safe.
#ifndef KINDRED_IO_WARC_DOCUMENTS_H_
#define KINDRED_IO_WARC_DOCUMENTS_H_

#include <cstdint>
#include <functional>
#include <map>
#include <memory>
#include <string>

#include "absl/status/statusor.h"
#include "io/http_payload.h"
#include "io/warc_reader.h"
#include "kindred/corpus.h"

namespace kindred::io {

// What a record is.
struct RecordRole {
  bool document = false;
  enum class Payload { kNone, kHtml, kText } payload = Payload::kNone;
  std::string reason;  // for a record that is not a document: why, for the summary
};

// One record as read: its header, and its block when it is at most the
// read limit (`whole`); a larger block went to the reader's sink.
struct WarcRecord {
  WarcHeader header;
  std::string block;
  bool whole = false;
  std::string trailer;  // the bytes after the block, as read ("\r\n\r\n")
  RecordRole role;
};

class WarcDocuments {
 public:
  // `counts` (may be null) receives the count of each kind of record that
  // is not a document, by reason, and of other events.
  WarcDocuments(std::unique_ptr<ByteStream> stream, std::string name, const InputOptions& options,
                std::map<std::string, uint64_t>* counts);

  // Reads the next record into *record and decides its role. A block
  // larger than the read limit is passed to `sink` (may be empty) in
  // chunks instead. False at the end.
  absl::StatusOr<bool> Next(WarcRecord* record,
                            const std::function<absl::Status(absl::string_view)>& sink = {});
  // Fills doc->id, text and invalid_utf8 from a document record. With
  // `defer_html`, an HTML page is left with its UTF-8 source in doc->text
  // and doc->unparsed and unparsed_html set, for LineParser::Finish to
  // extract its text (on another thread); the nesting guard is applied
  // here all the same.
  absl::Status MakeDocument(const WarcRecord& record, Document* doc, bool defer_html = false);
  const std::string& name() const { return reader_.name(); }

 private:
  void Count(const std::string& what) {
    if (counts_ != nullptr) ++(*counts_)[what];
  }
  RecordRole Decide(const WarcRecord& record) const;
  // Counts (or with strict, returns) a WARC-Payload-Digest that matches
  // neither the body as transferred nor the body with chunking removed.
  absl::Status CheckDigest(const WarcHeader& header, const HttpHead& head, absl::string_view body);

  WarcReader reader_;
  const InputOptions& options_;
  std::map<std::string, uint64_t>* counts_;
  std::string payload_, utf8_;  // reused buffers
};

// The second reading of one document: reads the record at byte `offset`
// of `path` (WarcHeader::raw_offset: a gzip member, or a record of a plain
// file) and makes its document as MakeDocument does, HTML left for
// LineParser::Finish. InputChanged when there is no document record there
// (the file changed). Thread-safe (each call opens its own stream).
absl::Status ReadWarcDocumentAt(const std::string& path, uint64_t offset,
                                const InputOptions& options, Document* doc);

// The text of a payload: converted to UTF-8 by the charset rules, and for
// HTML reduced to its text. `declared` is the Content-Type charset.
// *by_reference as HtmlToText sets it.
absl::Status PayloadText(absl::string_view payload, absl::string_view declared, bool html,
                         std::string* scratch, std::string* text, uint32_t* replaced,
                         bool* by_reference = nullptr);

// The payload converted to UTF-8 by the charset rules (the first step of
// PayloadText).
absl::Status PayloadUtf8(absl::string_view payload, absl::string_view declared, bool html,
                         std::string* utf8, uint32_t* replaced);

}  // namespace kindred::io

#endif  // KINDRED_IO_WARC_DOCUMENTS_H_
