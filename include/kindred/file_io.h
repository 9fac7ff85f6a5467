// kindred: the small file interface the index goes through.
//
// Every byte the index writes, every sync, rename, truncation and lock goes
// through a FileSystem, so tests can inject faults (a full disk, a failed
// sync, a crash after the Nth write) without root or special file systems.
// DefaultFileSystem() is the real POSIX implementation.
//
// Scratch data (sorted runs of band keys spilled under a memory budget) goes
// through a FileSystem too, as a ScratchFile.
//
// Errors are values (kindred/errors.h), with the kind decided here, where
// they arise: writes report DiskFull (ResourceExhausted) when the disk, the
// quota or the file size limit is full (ENOSPC, EDQUOT, EFBIG) and
// WriteFailed (Aborted) for any other failed system call, with the path and
// the system's message. Lock conflicts report Unavailable.
//
// Thread-safety: a FileSystem may be shared by threads; each AppendFile,
// FileLock and MappedFile belongs to one thread at a time; a ScratchFile is
// read by any number of threads at once (see there).
#ifndef KINDRED_FILE_IO_H_
#define KINDRED_FILE_IO_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"

namespace kindred {

// A file open for appending. Bytes reach stable storage only after Sync().
class AppendFile {
 public:
  virtual ~AppendFile() = default;
  // Appends all of `bytes` at the end of the file (or fails).
  virtual absl::Status Append(std::string_view bytes) = 0;
  // Flushes written data, and the metadata needed to read it back (size,
  // block map), to stable storage (fdatasync).
  virtual absl::Status Sync() = 0;
  // Overwrites bytes [offset, offset + bytes.size()), which must lie within
  // the file (the index's commit area, rewritten in place). The file's size
  // and the position of later appends do not change.
  virtual absl::Status WriteAt(uint64_t offset, std::string_view bytes) = 0;
  // Cuts the file to `size` bytes; later appends continue from there.
  virtual absl::Status Truncate(uint64_t size) = 0;
  // The file's current size in bytes.
  virtual uint64_t size() const = 0;
};

// A read-only mapping of a whole file, valid until destroyed. The bytes must
// not be used after the object is gone.
class MappedFile {
 public:
  virtual ~MappedFile() = default;
  virtual std::string_view bytes() const = 0;
};

// A temporary file without a name, for data too large for memory. It is
// created in a directory (the scratch directory) with no name there (or
// unlinked at once), so nothing is left behind when it is destroyed, nor
// when the process dies. Bytes are appended at the end and read back at
// any offset; nothing is synced.
//
// Thread-safety: Append is called by one thread at a time, never during a
// ReadAt; once written, any number of threads may ReadAt at once (reads
// share no position). size() follows the last Append.
class ScratchFile {
 public:
  virtual ~ScratchFile() = default;
  // Appends all of `bytes`. Errors: DiskFull (no space, quota or file size
  // limit), else WriteFailed; the message names the scratch directory. After
  // an error, size() counts what part of `bytes` was written: read only what
  // earlier appends wrote, at the offsets size() gave before them.
  virtual absl::Status Append(std::string_view bytes) = 0;
  // Reads exactly out.size() bytes at `offset` into `out`. Requires
  // offset + out.size() <= size() (else Internal). Errors: WriteFailed
  // naming the scratch directory (the system could not read back what it
  // took: the scratch data is lost).
  virtual absl::Status ReadAt(uint64_t offset, absl::Span<char> out) const = 0;
  // Bytes appended so far.
  virtual uint64_t size() const = 0;
};

// An exclusive advisory lock, released when destroyed.
class FileLock {
 public:
  virtual ~FileLock() = default;
};

class FileSystem {
 public:
  virtual ~FileSystem() = default;

  // Opens an existing file for appending at its end.
  virtual absl::StatusOr<std::unique_ptr<AppendFile>> OpenAppend(const std::string& path) = 0;
  // Creates a new empty file; fails with AlreadyExists if it exists.
  virtual absl::StatusOr<std::unique_ptr<AppendFile>> CreateNew(const std::string& path) = 0;
  // Maps an existing file read-only (an empty file maps to no bytes).
  virtual absl::StatusOr<std::unique_ptr<MappedFile>> Map(const std::string& path) = 0;
  // Takes flock(LOCK_EX | LOCK_NB) on an existing file: never waits. Returns
  // Unavailable at once when another process (or object) holds it. The lock
  // is tied to the file's identity at the time of locking.
  virtual absl::StatusOr<std::unique_ptr<FileLock>> LockExclusive(const std::string& path) = 0;
  // True when `path` still names the file `lock` was taken on.
  virtual bool LockStillNamesPath(const FileLock& lock, const std::string& path) = 0;
  // Atomically renames `from` to `to`. With replace == false, fails with
  // AlreadyExists instead of replacing an existing `to`.
  virtual absl::Status Rename(const std::string& from, const std::string& to, bool replace) = 0;
  // Removes a file (used to clean up temporary files).
  virtual absl::Status Remove(const std::string& path) = 0;
  // Syncs the directory that holds `path`, making a creation or rename durable.
  virtual absl::Status SyncDirectoryOf(const std::string& path) = 0;
  // Whether `path` exists.
  virtual bool Exists(const std::string& path) = 0;
  // Creates an empty ScratchFile in directory `dir`; the caller owns it.
  // Errors: DiskFull, or WriteFailed (a missing directory, no permission),
  // naming `dir`.
  virtual absl::StatusOr<std::unique_ptr<ScratchFile>> CreateScratch(const std::string& dir) = 0;
};

// The POSIX file system. Never null; lives for the whole program.
FileSystem* DefaultFileSystem();

}  // namespace kindred

#endif  // KINDRED_FILE_IO_H_
