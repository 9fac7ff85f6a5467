#include "service/service_errors.h"

#include <string>

#include "absl/strings/cord.h"

namespace kindred::service {
namespace {

struct RefusalRow {
  Refusal refusal;
  absl::StatusCode code;
  std::string_view name;
};

constexpr RefusalRow kRefusals[] = {
    {Refusal::kDuplicateId, absl::StatusCode::kAlreadyExists, "duplicate_id"},
    {Refusal::kReadOnly, absl::StatusCode::kFailedPrecondition, "read_only"},
    {Refusal::kUnavailable, absl::StatusCode::kUnavailable, "unavailable"},
};

absl::string_view Absl(std::string_view text) {
  return absl::string_view(text.data(), text.size());
}

}  // namespace

absl::Status Refuse(Refusal refusal, std::string_view message) {
  for (const RefusalRow& row : kRefusals) {
    if (row.refusal != refusal) continue;
    absl::Status status(row.code, Absl(message));
    status.SetPayload(Absl(kRefusalPayload), absl::Cord(Absl(row.name)));
    return status;
  }
  return absl::InternalError(Absl(message));  // every refusal has a row
}

std::optional<Refusal> RefusalOf(const absl::Status& status) {
  const auto payload = status.GetPayload(Absl(kRefusalPayload));
  if (!payload.has_value()) return std::nullopt;
  for (const RefusalRow& row : kRefusals) {
    if (*payload == Absl(row.name)) return row.refusal;
  }
  return std::nullopt;
}

}  // namespace kindred::service
