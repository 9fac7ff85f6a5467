"""kindred's errors: one exception class per error kind, under KindredError.

Each carries the message the command-line program prints after "kindred: ",
its kind (the names of include/kindred/errors.h) and the exit code the
program would end with (README, "Exit codes").
"""

from __future__ import annotations

__all__ = [
    "KindredError", "InvalidRequestError", "BadInputError", "LimitExceededError",
    "InputChangedError", "IndexDamagedError", "SettingsMismatchError",
    "IndexBusyError", "DiskFullError", "WriteFailedError", "InternalError",
    "error_class",
]


class KindredError(Exception):
    """Base of every kindred error. ``str(error)`` is the message;
    ``error.kind`` the kind's name; ``error.exit_code`` the program's code."""

    kind = "internal"
    exit_code = 8

    @property
    def message(self) -> str:
        return str(self)


def _kind(name: str, kind: str, exit_code: int, doc: str) -> type:
    return type(name, (KindredError,), {"kind": kind, "exit_code": exit_code, "__doc__": doc})


InvalidRequestError = _kind("InvalidRequestError", "invalid_request", 2,
                            "Options or settings that do not fit together (exit 2).")
BadInputError = _kind("BadInputError", "bad_input", 3,
                      "An input missing, unreadable or malformed (exit 3).")
LimitExceededError = _kind("LimitExceededError", "limit_exceeded", 3,
                           "An input over a size limit (exit 3).")
InputChangedError = _kind("InputChangedError", "input_changed", 3,
                          "An input read twice was not the same the second time (exit 3).")
IndexDamagedError = _kind("IndexDamagedError", "index_damaged", 4,
                          "An index file corrupt, truncated or not an index (exit 4).")
SettingsMismatchError = _kind("SettingsMismatchError", "settings_mismatch", 5,
                              "An index made with other settings or a newer format (exit 5).")
IndexBusyError = _kind("IndexBusyError", "index_busy", 6,
                       "Another writer holds the index (exit 6).")
DiskFullError = _kind("DiskFullError", "disk_full", 7,
                      "No space left on the device (exit 7).")
WriteFailedError = _kind("WriteFailedError", "write_failed", 7,
                         "An output could not be written (exit 7).")
InternalError = _kind("InternalError", "internal", 8, "A bug: please report it (exit 8).")

_BY_KIND = {cls.kind: cls for cls in (
    InvalidRequestError, BadInputError, LimitExceededError, InputChangedError,
    IndexDamagedError, SettingsMismatchError, IndexBusyError, DiskFullError,
    WriteFailedError, InternalError)}


def error_class(kind: str) -> type:
    """The exception class of an error kind's name ("bad_input", ...)."""
    return _BY_KIND.get(kind, InternalError)
