// kindred: the small file interface the index goes through.
//
// Every byte the index writes, every sync, rename, truncation and lock goes
// through a FileSystem, so tests can inject faults (a full disk, a failed
// sync, a crash after the Nth write) without root or special file systems.
// DefaultFileSystem() is the real POSIX implementation.
//
// Scratch data (sorted runs of band keys spilled under a memory budget) goes
// through a FileSystem too, as a ScratchFile. So do the inputs (ReadableFile,
// Stat, ListDirectory) and the directories outputs are written into
// (CreateDirectories, CreateDirectory), so that tests can fail a read or a
// directory at any place. Standard input is no file of a FileSystem.
//
// Errors are values (kindred/errors.h), with the kind decided here, where
// they arise: writes report DiskFull (ResourceExhausted) when the disk, the
// quota or the file size limit is full (ENOSPC, EDQUOT, EFBIG) and
// WriteFailed (Aborted) for any other failed system call, with the path and
// the system's message. Lock conflicts report Unavailable. Reads of inputs
// (OpenRead, ReadableFile, Stat, ListDirectory) report BadInput with the
// errno's canonical code (NotFound for a missing file), the message
// "<path>: <what>: <system's message>".
//
// Thread-safety: a FileSystem may be shared by threads; each AppendFile,
// FileLock and MappedFile belongs to one thread at a time; a ScratchFile and
// a ReadableFile are read at offsets by any number of threads at once (see
// there).
#ifndef KINDRED_FILE_IO_H_
#define KINDRED_FILE_IO_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

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

// A file open for reading: sequential reads from a position (which starts
// at byte 0), and reads at any offset, which share no position. The file is
// read as it is when each read happens (no snapshot).
//
// Thread-safety: Read and Seek by one thread at a time; ReadAt by any
// number of threads at once, also during a Read.
class ReadableFile {
 public:
  virtual ~ReadableFile() = default;
  // Reads up to out.size() (>= 1) bytes at the position and moves it past
  // them. Returns the count; 0 only at the end of the file. Errors: BadInput
  // "<path>: read failed: <system's message>".
  virtual absl::StatusOr<size_t> Read(absl::Span<char> out) = 0;
  // Reads up to out.size() bytes at `offset`; fewer only where the file
  // ends (0 at or past its end). The position does not move. Errors:
  // BadInput "<path>: cannot read: <system's message>".
  virtual absl::StatusOr<size_t> ReadAt(uint64_t offset, absl::Span<char> out) const = 0;
  // Moves the position to `offset` (past the end is allowed: reads there
  // return 0). Errors: BadInput "<path>: cannot read at byte <offset>: ...".
  virtual absl::Status Seek(uint64_t offset) = 0;
};

// What a path names.
enum class FileKind : uint8_t {
  kFile,  // a regular file
  kDirectory,
  kLink,        // a symbolic link (not followed)
  kBrokenLink,  // a symbolic link, followed, that leads nowhere
  kFifo,
  kSocket,
  kDevice,  // a character or block device, or anything else
  kGone,    // listed, but gone (or not readable) when looked at
};

struct FileInfo {
  FileKind kind = FileKind::kFile;
  uint64_t size = 0;  // bytes, for a regular file
  // The file's identity: equal pairs name one file.
  uint64_t device = 0;
  uint64_t inode = 0;
};

struct DirectoryEntry {
  std::string name;  // not "." or ".."
  FileKind kind = FileKind::kGone;
};

struct DirectoryListing {
  uint64_t device = 0, inode = 0;       // the directory's identity (FileInfo)
  std::vector<DirectoryEntry> entries;  // in the order the system gives
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
  // Atomically renames `from` to `to` (files, or directories: a directory
  // replaces only an empty one). With replace == false, fails with
  // AlreadyExists instead of replacing an existing `to`; a directory `to`
  // that is not empty is AlreadyExists either way. Messages: "cannot rename
  // to <to>: <system's message>".
  virtual absl::Status Rename(const std::string& from, const std::string& to, bool replace) = 0;
  // Removes a file, or an empty directory (used to clean up temporary
  // files and directories).
  virtual absl::Status Remove(const std::string& path) = 0;
  // Syncs the directory that holds `path`, making a creation or rename durable.
  virtual absl::Status SyncDirectoryOf(const std::string& path) = 0;
  // Whether `path` exists.
  virtual bool Exists(const std::string& path) = 0;
  // Creates an empty ScratchFile in directory `dir`; the caller owns it.
  // Errors: DiskFull, or WriteFailed (a missing directory, no permission),
  // naming `dir`.
  virtual absl::StatusOr<std::unique_ptr<ScratchFile>> CreateScratch(const std::string& dir) = 0;

  // Opens an existing file for reading; the caller owns it. Errors: BadInput
  // "<path>: cannot open: <system's message>" (NotFound when missing).
  virtual absl::StatusOr<std::unique_ptr<ReadableFile>> OpenRead(const std::string& path) = 0;
  // What `path` names, following symbolic links. Errors: BadInput
  // "<path>: cannot open: <system's message>" (NotFound when missing).
  virtual absl::StatusOr<FileInfo> Stat(const std::string& path) = 0;
  // The entries of directory `path`. An entry's kind is that of the entry
  // itself (a symbolic link is kLink); with `follow_links`, a link has the
  // kind of what it leads to, or kBrokenLink. Errors: BadInput "<path>:
  // cannot read directory: <system's message>".
  virtual absl::StatusOr<DirectoryListing> ListDirectory(const std::string& path,
                                                         bool follow_links) = 0;
  // Creates directory `path` and its missing parents (mode 0755 less the
  // umask); an existing directory is no error. Errors: as writes (DiskFull,
  // else WriteFailed), "<path>: cannot create directory: <system's
  // message>".
  virtual absl::Status CreateDirectories(const std::string& path) = 0;
  // Creates one directory, mode 0755 less the umask. Errors: AlreadyExists
  // when `path` exists, else as CreateDirectories.
  virtual absl::Status CreateDirectory(const std::string& path) = 0;
};

// The POSIX file system. Never null; lives for the whole program.
FileSystem* DefaultFileSystem();

// Reads `file` from its position to its end (for small files: labels, a
// token, a list of ids). Errors: those of ReadableFile::Read.
absl::StatusOr<std::string> ReadToEnd(ReadableFile& file);

}  // namespace kindred

#endif  // KINDRED_FILE_IO_H_
