// The body of a check or add request to the service, parsed and bounded.
//
// A JSON body is an object:
//   {"documents": [{"id": "...", "text": "..."}, ...],
//    "threshold": 0.8, "measure": "jaccard", "max_bucket": 5000,
//    "on_duplicate": "error", "marked_spans": false}
// where everything but "documents" is optional. A text/plain body is one
// document whose id is the `id` query parameter ("upload" when absent).
// A JSON body with invalid UTF-8 is read with each ill-formed sequence
// replaced by U+FFFD first, as JSON Lines inputs are; text bodies keep
// their bytes (signing replaces them).
//
// Thread-safety: pure functions.
#ifndef KINDRED_SERVICE_SERVICE_REQUEST_H_
#define KINDRED_SERVICE_SERVICE_REQUEST_H_

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/index_query.h"
#include "kindred/index_writer.h"

namespace kindred::service {

struct RequestLimits {
  uint64_t max_document_bytes = 64ull << 20;  // one document's text
  uint64_t max_documents = 10000;             // documents per request
  uint32_t max_depth = 8;                     // JSON nesting
};

struct ServiceRequest {
  std::vector<TextDocument> documents;
  QueryRequest query;
  uint64_t max_bucket = kDefaultMaxBucket;
  DuplicateIdPolicy on_duplicate = DuplicateIdPolicy::kError;
  // Also report, per match with an indexed document, the byte spans of the
  // upload whose shingles the matched document holds.
  bool marked_spans = false;
};

// Parses a JSON request body. Errors (kindred/errors.h): BadInput
// (malformed JSON, a missing or mistyped field, an unknown measure or
// policy, nesting deeper than the limit; the message says which),
// LimitExceeded (a document or the document count over its limit).
absl::StatusOr<ServiceRequest> ParseJsonRequest(std::string_view body, const RequestLimits& limits);

// A text/plain body as one document with id `id`. Errors: LimitExceeded.
absl::StatusOr<ServiceRequest> TextRequest(std::string_view body, std::string id,
                                           const RequestLimits& limits);

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_SERVICE_REQUEST_H_
