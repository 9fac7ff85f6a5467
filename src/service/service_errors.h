// Refusals of the service that are no error kind of the library
// (kindred/errors.h): an id that is already taken, an add on a read-only
// service, a service that cannot take the request now. Each is a status
// with a canonical code (listed) and a payload naming the refusal under
// kRefusalPayload; everything else the service returns carries a library
// error kind. The HTTP layer turns both into a status and a JSON "kind" in
// one table (src/cli/serve_http.cc, HttpErrorFor).
//
//   refusal        code                 HTTP
//   kDuplicateId   AlreadyExists        409 duplicate_id
//   kReadOnly      FailedPrecondition   405 read_only
//   kUnavailable   Unavailable          503 unavailable
//
// Thread-safety: plain functions over values.
#ifndef KINDRED_SERVICE_SERVICE_ERRORS_H_
#define KINDRED_SERVICE_SERVICE_ERRORS_H_

#include <cstdint>
#include <optional>
#include <string_view>

#include "absl/status/status.h"

namespace kindred::service {

enum class Refusal : uint8_t {
  kDuplicateId,  // an id repeated in a request, or already indexed
  kReadOnly,     // an add on a service without --allow-add
  kUnavailable,  // stopping, or the writer cannot be opened again
};

inline constexpr std::string_view kRefusalPayload = "kindred/service-refusal";

// A status of `refusal` with `message`.
absl::Status Refuse(Refusal refusal, std::string_view message);

// The refusal a status carries, if any.
std::optional<Refusal> RefusalOf(const absl::Status& status);

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_SERVICE_ERRORS_H_
