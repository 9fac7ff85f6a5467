// kindred: the small file interface the index goes through.
//
// Every byte the index writes, every sync, rename, truncation and lock goes
// through a FileSystem, so tests can inject faults (a full disk, a failed
// sync, a crash after the Nth write) without root or special file systems.
// DefaultFileSystem() is the real POSIX implementation.
//
// Errors are values: writes report ResourceExhausted when the disk (or quota)
// is full and Aborted for any other failed system call, with the path and
// the system's message. Lock conflicts report Unavailable.
//
// Thread-safety: a FileSystem may be shared by threads; each AppendFile,
// FileLock and MappedFile belongs to one thread at a time.
#ifndef KINDRED_FILE_IO_H_
#define KINDRED_FILE_IO_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/status/statusor.h"

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
};

// The POSIX file system. Never null; lives for the whole program.
FileSystem* DefaultFileSystem();

}  // namespace kindred

#endif  // KINDRED_FILE_IO_H_
