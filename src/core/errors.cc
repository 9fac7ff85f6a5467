
#include "kindred/errors.h"

#include <cerrno>
#include <string>
#include <utility>

#include "absl/strings/cord.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"

namespace kindred {
namespace {

constexpr ErrorKind kAllKinds[] = {ErrorKind::kInternal,         ErrorKind::kInvalidRequest,
                                   ErrorKind::kBadInput,         ErrorKind::kLimitExceeded,
                                   ErrorKind::kInputChanged,     ErrorKind::kIndexDamaged,
                                   ErrorKind::kSettingsMismatch, ErrorKind::kIndexBusy,
                                   ErrorKind::kDiskFull,         ErrorKind::kWriteFailed};

absl::string_view PayloadUrl() {
  return absl::string_view(kErrorKindPayload.data(), kErrorKindPayload.size());
}

absl::Status Make(absl::StatusCode code, ErrorKind kind, std::string_view message) {
  return WithKind(absl::Status(code, absl::string_view(message.data(), message.size())), kind);
}

// The kind of a status that records none, by its canonical code.
ErrorKind KindOfCode(absl::StatusCode code) {
  switch (code) {
    case absl::StatusCode::kInvalidArgument:
    case absl::StatusCode::kNotFound:
    case absl::StatusCode::kOutOfRange:
    case absl::StatusCode::kPermissionDenied:
      return ErrorKind::kBadInput;
    case absl::StatusCode::kResourceExhausted:
      return ErrorKind::kLimitExceeded;
    case absl::StatusCode::kDataLoss:
      return ErrorKind::kIndexDamaged;
    case absl::StatusCode::kFailedPrecondition:
      return ErrorKind::kSettingsMismatch;
    case absl::StatusCode::kUnavailable:
      return ErrorKind::kIndexBusy;
    case absl::StatusCode::kAborted:
      return ErrorKind::kWriteFailed;
    default:
      return ErrorKind::kInternal;
  }
}

}  // namespace

absl::Status InvalidRequest(std::string_view message) {
  return Make(absl::StatusCode::kInvalidArgument, ErrorKind::kInvalidRequest, message);
}
absl::Status BadInput(std::string_view message) {
  return Make(absl::StatusCode::kInvalidArgument, ErrorKind::kBadInput, message);
}
absl::Status LimitExceeded(std::string_view message) {
  return Make(absl::StatusCode::kResourceExhausted, ErrorKind::kLimitExceeded, message);
}
absl::Status InputChanged(std::string_view message) {
  return Make(absl::StatusCode::kInvalidArgument, ErrorKind::kInputChanged, message);
}
absl::Status IndexDamaged(std::string_view message) {
  return Make(absl::StatusCode::kDataLoss, ErrorKind::kIndexDamaged, message);
}
absl::Status SettingsMismatch(std::string_view message) {
  return Make(absl::StatusCode::kFailedPrecondition, ErrorKind::kSettingsMismatch, message);
}
absl::Status IndexBusy(std::string_view message) {
  return Make(absl::StatusCode::kUnavailable, ErrorKind::kIndexBusy, message);
}
absl::Status DiskFull(std::string_view message) {
  return Make(absl::StatusCode::kResourceExhausted, ErrorKind::kDiskFull, message);
}
absl::Status WriteFailed(std::string_view message) {
  return Make(absl::StatusCode::kAborted, ErrorKind::kWriteFailed, message);
}

absl::Status InputErrno(int error, std::string_view message) {
  return WithKind(absl::ErrnoToStatus(error, absl::string_view(message.data(), message.size())),
                  ErrorKind::kBadInput);
}

absl::Status OutputErrno(int error, std::string_view message) {
  absl::Status status =
      absl::ErrnoToStatus(error, absl::string_view(message.data(), message.size()));
  if (error == ENOSPC || error == EDQUOT) return DiskFull(std::string(status.message()));
  if (error == ENAMETOOLONG) return WithKind(std::move(status), ErrorKind::kInvalidRequest);
  return WithKind(std::move(status), ErrorKind::kWriteFailed);
}

absl::Status WithKind(absl::Status status, ErrorKind kind) {
  if (status.ok()) return status;
  const std::string_view name = ErrorKindName(kind);
  status.SetPayload(PayloadUrl(), absl::Cord(absl::string_view(name.data(), name.size())));
  return status;
}

ErrorKind KindOf(const absl::Status& status) {
  if (status.ok()) return ErrorKind::kInternal;
  if (const auto payload = status.GetPayload(PayloadUrl()); payload.has_value()) {
    for (ErrorKind kind : kAllKinds) {
      const std::string_view name = ErrorKindName(kind);
      if (*payload == absl::string_view(name.data(), name.size())) return kind;
    }
  }
  return KindOfCode(status.code());
}

std::string_view ErrorKindName(ErrorKind kind) {
  switch (kind) {
    case ErrorKind::kInvalidRequest:
      return "invalid_request";
    case ErrorKind::kBadInput:
      return "bad_input";
    case ErrorKind::kLimitExceeded:
      return "limit_exceeded";
    case ErrorKind::kInputChanged:
      return "input_changed";
    case ErrorKind::kIndexDamaged:
      return "index_damaged";
    case ErrorKind::kSettingsMismatch:
      return "settings_mismatch";
    case ErrorKind::kIndexBusy:
      return "index_busy";
    case ErrorKind::kDiskFull:
      return "disk_full";
    case ErrorKind::kWriteFailed:
      return "write_failed";
    case ErrorKind::kInternal:
      break;
  }
  return "internal";
}

absl::Status WithMessage(const absl::Status& status, std::string_view message) {
  if (status.ok()) return status;
  absl::Status out(status.code(), absl::string_view(message.data(), message.size()));
  status.ForEachPayload(
      [&out](absl::string_view url, const absl::Cord& payload) { out.SetPayload(url, payload); });
  return out;
}

absl::Status WithPathShownAs(const absl::Status& status, std::string_view path,
                             std::string_view shown) {
  const absl::string_view message = status.message();
  if (status.ok() || path == shown ||
      !absl::StartsWith(message, absl::string_view(path.data(), path.size()))) {
    return status;
  }
  return WithMessage(status, absl::StrCat(absl::string_view(shown.data(), shown.size()),
                                          message.substr(path.size())));
}

absl::Status Annotate(const absl::Status& status, std::string_view context) {
  if (status.ok()) return status;
  return WithMessage(status, absl::StrCat(absl::string_view(context.data(), context.size()), ": ",
                                          status.message()));
}

}  // namespace kindred
