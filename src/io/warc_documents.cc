// WarcDocuments: records to documents.
#include "io/warc_documents.h"

#include <array>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "io/charset.h"
#include "io/html_text.h"
#include "io/http_payload.h"
#include "io/sha1.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

// Room for the HTTP status line and headers above the payload limit.
constexpr uint64_t kHttpHeadBytes = 1 << 20;

RecordRole::Payload PayloadOf(absl::string_view media_type) {
  if (media_type == "text/html" || media_type == "application/xhtml+xml") {
    return RecordRole::Payload::kHtml;
  }
  if (media_type == "text/plain") return RecordRole::Payload::kText;
  return RecordRole::Payload::kNone;
}

RecordRole NotDocument(std::string reason) {
  RecordRole role;
  role.reason = std::move(reason);
  return role;
}

std::string MediaTypeOf(const WarcHeader& header) {
  std::string media_type, charset;
  ParseContentType(header.Field("Content-Type"), &media_type, &charset);
  return media_type;
}

// `expected`: the SHA-1 of `bytes` in base32 (the usual form) or hex, any
// case.
bool DigestMatches(absl::string_view expected, absl::string_view bytes) {
  Sha1 sha;
  sha.Update(bytes);
  const std::array<uint8_t, 20> digest = sha.Finish();
  if (absl::EqualsIgnoreCase(expected, Base32(digest.data(), digest.size()))) return true;
  std::string hex;
  for (uint8_t byte : digest) absl::StrAppend(&hex, absl::Hex(byte, absl::kZeroPad2));
  return absl::EqualsIgnoreCase(expected, hex);
}

absl::string_view StripAngles(absl::string_view value) {
  if (value.size() >= 2 && value.front() == '<' && value.back() == '>') {
    value = value.substr(1, value.size() - 2);
  }
  return value;
}

}  // namespace

WarcDocuments::WarcDocuments(std::unique_ptr<ByteStream> stream, std::string name,
                             const InputOptions& options, std::map<std::string, uint64_t>* counts)
    : reader_(std::move(stream), std::move(name)), options_(options), counts_(counts) {}

RecordRole WarcDocuments::Decide(const WarcRecord& record) const {
  const std::string type = absl::AsciiStrToLower(record.header.Field("WARC-Type"));
  if (type != "response" && type != "resource" && type != "conversion") {
    return NotDocument(absl::StrCat(type.empty() ? "untyped" : type, " record"));
  }
  if (!record.whole) return NotDocument(absl::StrCat(type, " over --max-document-size"));
  const std::string media_type = MediaTypeOf(record.header);
  RecordRole role;
  if (type == "response") {
    if (!absl::StartsWith(media_type, "application/http")) {
      return NotDocument(absl::StrCat("response not HTTP (", media_type, ")"));
    }
    absl::StatusOr<HttpHead> head = ParseHttpHead(record.block);
    if (!head.ok()) return NotDocument("response with a malformed HTTP head");
    if (!options_.warc.any_status && (head->status < 200 || head->status > 299)) {
      return NotDocument(absl::StrCat("HTTP status ", head->status));
    }
    role.payload = PayloadOf(head->media_type);
    if (role.payload == RecordRole::Payload::kNone) {
      return NotDocument(absl::StrCat("response of type ",
                                      head->media_type.empty() ? "(none)" : head->media_type));
    }
  } else if (type == "resource") {
    role.payload = PayloadOf(media_type);
    if (role.payload == RecordRole::Payload::kNone) {
      return NotDocument(
          absl::StrCat("resource of type ", media_type.empty() ? "(none)" : media_type));
    }
  } else {
    role.payload = media_type.empty() ? RecordRole::Payload::kText : PayloadOf(media_type);
    if (role.payload == RecordRole::Payload::kNone) {
      return NotDocument(absl::StrCat("conversion of type ", media_type));
    }
  }
  role.document = true;
  return role;
}

absl::StatusOr<bool> WarcDocuments::Next(
    WarcRecord* record, const std::function<absl::Status(absl::string_view)>& sink) {
  absl::StatusOr<bool> more = reader_.NextHeader(&record->header);
  if (!more.ok() || !*more) return more;
  const uint64_t limit = options_.max_document_bytes + kHttpHeadBytes;
  record->whole = record->header.content_length <= limit;
  absl::Status read;
  if (record->whole) {
    read = reader_.ReadBlock(&record->block);
  } else {
    record->block.clear();
    read = reader_.SkipBlock(sink);
  }
  if (!read.ok()) return read;
  record->trailer = reader_.trailer();
  record->role = Decide(*record);
  if (!record->role.document) {
    if (options_.warc.strict && !record->whole) {
      return LimitExceeded(absl::StrCat(reader_.Where(), ": the record's block of ",
                                        record->header.content_length,
                                        " bytes is larger than the limit (--max-document-size)"));
    }
    Count(record->role.reason);
  }
  return true;
}

absl::Status PayloadUtf8(absl::string_view payload, absl::string_view declared, bool html,
                         std::string* utf8, uint32_t* replaced) {
  size_t bom = 0;
  const std::string encoding = ChooseEncoding(declared, payload, html, &bom);
  payload.remove_prefix(bom);
  return ConvertToUtf8(encoding, payload, utf8, replaced);
}

absl::Status PayloadText(absl::string_view payload, absl::string_view declared, bool html,
                         std::string* scratch, std::string* text, uint32_t* replaced,
                         bool* by_reference) {
  if (!html) return PayloadUtf8(payload, declared, html, text, replaced);
  if (absl::Status s = PayloadUtf8(payload, declared, html, scratch, replaced); !s.ok()) return s;
  // ConvertToUtf8 makes the page valid UTF-8.
  return HtmlToText(*scratch, text, /*valid_utf8=*/true, by_reference);
}

absl::Status WarcDocuments::CheckDigest(const WarcHeader& header, const HttpHead& head,
                                        absl::string_view body) {
  absl::string_view digest = header.Field("WARC-Payload-Digest");
  if (!absl::StartsWithIgnoreCase(digest, "sha1:")) return absl::OkStatus();
  if (DigestMatches(digest.substr(5), body)) return absl::OkStatus();
  std::string dechunked;
  if (absl::StrContains(head.transfer_encoding, "chunked") &&
      Dechunk(body, options_.max_document_bytes, &dechunked).ok() &&
      DigestMatches(digest.substr(5), dechunked)) {
    return absl::OkStatus();
  }
  if (options_.warc.strict) {
    return absl::InvalidArgumentError(
        absl::StrCat(reader_.Where(), ": WARC-Payload-Digest does not match the payload"));
  }
  Count("payload digest mismatch (counted, still read)");
  return absl::OkStatus();
}

absl::Status WarcDocuments::MakeDocument(const WarcRecord& record, Document* doc, bool defer_html) {
  const WarcHeader& header = record.header;
  absl::string_view uri = StripAngles(header.Field("WARC-Target-URI"));
  absl::string_view record_id = header.Field("WARC-Record-ID");
  const bool by_record_id = options_.warc.id_source == WarcIdSource::kRecordId;
  absl::string_view id = by_record_id ? record_id : uri;
  if (id.empty()) id = by_record_id ? uri : record_id;
  doc->id.assign(id.data(), id.size());
  doc->unparsed = doc->unparsed_html = false;
  doc->html_page = doc->html_by_reference = false;
  doc->priority = 0;
  doc->has_priority = false;
  doc->source.line = 0;
  doc->source.offset = kUnknownOffset;
  absl::string_view payload = record.block;
  std::string declared, media_type;
  ParseContentType(header.Field("Content-Type"), &media_type, &declared);
  const uint64_t limit = options_.max_document_bytes;
  if (absl::StartsWith(media_type, "application/http")) {
    absl::StatusOr<HttpHead> head = ParseHttpHead(record.block);
    if (!head.ok()) return head.status();  // Decide() saw it parse
    declared = head->charset;
    absl::string_view body = payload.substr(head->body_offset);
    if (absl::Status checked = CheckDigest(header, *head, body); !checked.ok()) return checked;
    absl::Status decoded = DecodeHttpBody(*head, body, limit, &payload_);
    if (decoded.code() == absl::StatusCode::kResourceExhausted) {
      return LimitExceeded(absl::StrCat(reader_.Where(), ": ", decoded.message(),
                                        " (--max-document-size); a decompression bomb?"));
    }
    if (!decoded.ok()) {
      Count("payload not decodable (empty text)");
      payload_.clear();
    }
    payload = payload_;
  }
  const bool html = record.role.payload == RecordRole::Payload::kHtml;
  doc->html_page = html;
  absl::Status made;
  if (html && defer_html) {
    made = PayloadUtf8(payload, declared, html, &doc->text, &doc->invalid_utf8);
    if (made.ok() && NestsTooDeeply(doc->text)) {
      made = absl::FailedPreconditionError("nested too deeply");
    } else if (made.ok()) {
      doc->unparsed = doc->unparsed_html = true;  // LineParser::Finish extracts the text
    }
  } else {
    made = PayloadText(payload, declared, html, &utf8_, &doc->text, &doc->invalid_utf8,
                       &doc->html_by_reference);
  }
  if (made.code() == absl::StatusCode::kFailedPrecondition) {  // the nesting guard
    Count("HTML nested too deeply to parse (empty text)");
    doc->text.clear();
    return absl::OkStatus();
  }
  if (!made.ok()) return Annotate(made, reader_.Where());
  return absl::OkStatus();
}

absl::Status ReadWarcDocumentAt(const std::string& path, uint64_t offset,
                                const InputOptions& options, Document* doc) {
  DecodeOptions decode;
  decode.max_decompressed_bytes = options.max_decompressed_bytes;
  decode.file_system = options.file_system;
  auto stream = OpenDecoded(path, decode, nullptr, offset);
  if (!stream.ok()) return stream.status();
  WarcDocuments records(std::move(*stream), DisplayName(path), options, nullptr);
  WarcRecord record;
  absl::StatusOr<bool> read = records.Next(&record);
  if (read.ok() && *read && record.role.document) {
    return records.MakeDocument(record, doc, /*defer_html=*/true);
  }
  return InputChanged(
      absl::StrCat(DisplayName(path), ": no document record at byte ", offset,
                   read.ok() ? "" : absl::StrCat(" (", read.status().message(), ")"),
                   "; the file changed while kindred was reading it; run again"));
}

}  // namespace kindred::io
