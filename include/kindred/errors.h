// kindred: the kinds of error the library reports.
//
// Every error is an absl::Status. What a caller acts on (the program's exit
// code, an HTTP status, a retry) is its ErrorKind, decided where the error
// arises: the named constructors below make a status of one kind, with the
// canonical code listed beside it and the kind's name as a payload under
// kErrorKindPayload. KindOf reads the payload; a status made elsewhere
// (another library, older code) has none, and KindOf derives its kind from
// the canonical code (the right column).
//
//   kind               constructor       code                fallback codes
//   kInvalidRequest    InvalidRequest    InvalidArgument     -
//   kBadInput          BadInput          InvalidArgument     InvalidArgument, NotFound,
//                                                            OutOfRange, PermissionDenied
//   kLimitExceeded     LimitExceeded     ResourceExhausted   ResourceExhausted
//   kInputChanged      InputChanged      InvalidArgument     -
//   kIndexDamaged      IndexDamaged      DataLoss            DataLoss
//   kSettingsMismatch  SettingsMismatch  FailedPrecondition  FailedPrecondition
//   kIndexBusy         IndexBusy         Unavailable         Unavailable
//   kDiskFull          DiskFull          ResourceExhausted   -
//   kWriteFailed       WriteFailed       Aborted             Aborted
//   kInternal          (absl)            Internal            everything else
//
// The codes that two kinds share (InvalidArgument, ResourceExhausted) are
// why the kind travels as a payload: a full disk and a document over the
// size limit are both ResourceExhausted, but one is the output's fault and
// the other the input's. Re-wrapping a status with absl::Status(code, msg)
// drops its payload: add context with Annotate instead.
//
// Thread-safety: plain functions over values.
#ifndef KINDRED_ERRORS_H_
#define KINDRED_ERRORS_H_

#include <cstdint>
#include <string_view>

#include "absl/status/status.h"

namespace kindred {

enum class ErrorKind : uint8_t {
  kInternal,          // a bug: a broken invariant or a misused interface
  kInvalidRequest,    // options or settings that do not fit together
  kBadInput,          // an input missing, unreadable or malformed
  kLimitExceeded,     // an input over a size limit (document, line, header)
  kInputChanged,      // an input read twice was not the same the second time
  kIndexDamaged,      // an index file corrupt, truncated or not an index
  kSettingsMismatch,  // an index made with other settings or a newer format
  kIndexBusy,         // another writer holds an index
  kDiskFull,          // no space left on the device (or quota, file size)
  kWriteFailed,       // an output could not be written for another reason
};

// The payload's type URL; its value is ErrorKindName(kind).
inline constexpr std::string_view kErrorKindPayload = "kindred/error-kind";

// Statuses of one kind with `message` (which names the file, line, byte or
// document id where known).
absl::Status InvalidRequest(std::string_view message);
absl::Status BadInput(std::string_view message);
absl::Status LimitExceeded(std::string_view message);
absl::Status InputChanged(std::string_view message);
absl::Status IndexDamaged(std::string_view message);
absl::Status SettingsMismatch(std::string_view message);
absl::Status IndexBusy(std::string_view message);
absl::Status DiskFull(std::string_view message);
absl::Status WriteFailed(std::string_view message);

// A failed system call (`error` is its errno) with the message
// "<message>: <strerror>" and the errno's canonical code: on an input
// (BadInput), or on an output (DiskFull for ENOSPC and EDQUOT, InvalidRequest
// for a name too long, else WriteFailed).
absl::Status InputErrno(int error, std::string_view message);
absl::Status OutputErrno(int error, std::string_view message);

// `status` with its kind recorded as `kind` (its code and message kept).
// OK stays OK.
absl::Status WithKind(absl::Status status, ErrorKind kind);

// The kind of a failed status: its payload's, else derived from its code
// (table above). kInternal for OK (which is no error).
ErrorKind KindOf(const absl::Status& status);

// "invalid_request", "bad_input", "limit_exceeded", "input_changed",
// "index_damaged", "settings_mismatch", "index_busy", "disk_full",
// "write_failed", "internal".
std::string_view ErrorKindName(ErrorKind kind);

// `status` with `context` put before its message ("<context>: <message>"),
// its code and payloads (the kind) kept. OK stays OK.
absl::Status Annotate(const absl::Status& status, std::string_view context);
// `status` with its message replaced by `message`, its code and payloads
// kept. OK stays OK.
absl::Status WithMessage(const absl::Status& status, std::string_view message);
// `status` whose message starts with `path` (a file's name as a call saw it)
// with `shown` in its place, code and payloads kept; any other status as it
// is.
absl::Status WithPathShownAs(const absl::Status& status, std::string_view path,
                             std::string_view shown);

}  // namespace kindred

#endif  // KINDRED_ERRORS_H_
