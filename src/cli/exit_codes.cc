#include "cli/exit_codes.h"

#include "kindred/errors.h"

namespace kindred::cli {

int ExitCodeFor(const absl::Status& status) {
  if (status.ok()) return kExitOk;
  switch (KindOf(status)) {
    case ErrorKind::kInvalidRequest:
      return kExitUsage;
    case ErrorKind::kBadInput:
    case ErrorKind::kLimitExceeded:
    case ErrorKind::kInputChanged:
      return kExitInput;
    case ErrorKind::kIndexDamaged:
      return kExitIndexCorrupt;
    case ErrorKind::kSettingsMismatch:
      return kExitIndexMismatch;
    case ErrorKind::kIndexBusy:
      return kExitIndexBusy;
    case ErrorKind::kDiskFull:
    case ErrorKind::kWriteFailed:
      return kExitOutput;
    case ErrorKind::kInternal:
      break;
  }
  return kExitInternal;
}

}  // namespace kindred::cli
