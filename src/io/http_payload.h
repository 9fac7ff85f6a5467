// Internal: the HTTP response inside a WARC `response` record (RFC 9112
// message syntax): status line, header fields, and the body with its
// transfer coding (chunked) and content codings (gzip, deflate, br)
// removed.
//
// Thread-compatible plain functions.
#ifndef KINDRED_IO_HTTP_PAYLOAD_H_
#define KINDRED_IO_HTTP_PAYLOAD_H_

#include <cstdint>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"

namespace kindred::io {

struct HttpHead {
  int status = 0;                 // e.g. 200
  std::string media_type;         // Content-Type without parameters, lower case
  std::string charset;            // its charset parameter, as given ("" if none)
  std::string transfer_encoding;  // lower case, "" if none
  std::string content_encoding;   // lower case, "" if none
  size_t body_offset = 0;         // where the body starts in the block
};

// Parses "HTTP/x.y NNN reason" and the header fields up to the empty line.
// InvalidArgument (without a file name) when the block is not an HTTP
// response.
absl::StatusOr<HttpHead> ParseHttpHead(absl::string_view block);

// Splits a Content-Type value into its media type (lower case) and charset
// parameter (quotes removed).
void ParseContentType(absl::string_view value, std::string* media_type, std::string* charset);

// The body as a program gets it: chunked transfer coding removed, then each
// content coding undone (gzip, x-gzip, deflate with or without its zlib
// wrapper, br; identity). *out is at most max_bytes (ResourceExhausted
// otherwise, the decoding stops there). InvalidArgument for a malformed
// chunked body, a corrupt compressed body or an unknown coding.
absl::Status DecodeHttpBody(const HttpHead& head, absl::string_view body, uint64_t max_bytes,
                            std::string* out);

// Removes the chunked transfer coding (RFC 9112 section 7.1); trailers are
// dropped. A body cut short keeps the chunks that are whole.
absl::Status Dechunk(absl::string_view body, uint64_t max_bytes, std::string* out);

}  // namespace kindred::io

#endif  // KINDRED_IO_HTTP_PAYLOAD_H_
