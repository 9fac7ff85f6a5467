// Internal: the one way kindred writes a file whole or not at all.
//
// AtomicFile writes under a temporary name beside its final path
// ("PATH.tmp.PID", registered for removal on SIGINT/SIGTERM by
// kindred/temp_files.h, and the name RemoveStaleTempFiles looks for beside an
// index), and Commit syncs the file, renames it onto the path and syncs the
// directory. Destroyed without a successful Commit, it removes the temporary
// file, so a failed write leaves the path as it was (or absent). Every call
// goes through a FileSystem, so faults can be injected in tests. The index
// writers, the program's record outputs and the kept corpus all use it.
//
// Errors keep their kind (kindred/errors.h): DiskFull, WriteFailed, or
// AlreadyExists from Commit when `replace` is false and the path exists.
//
// Not thread-safe: one object per thread.
#ifndef KINDRED_IO_ATOMIC_FILE_H_
#define KINDRED_IO_ATOMIC_FILE_H_

#include <memory>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/file_io.h"

namespace kindred::io {

class AtomicFile {
 public:
  // Creates the temporary file beside `path` (whose directory must exist).
  // Borrows `fs`, which must outlive the object. With `replace` false,
  // Commit never replaces an existing `path`.
  static absl::StatusOr<std::unique_ptr<AtomicFile>> Create(const std::string& path, FileSystem* fs,
                                                            bool replace = true);
  ~AtomicFile();
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  // Appends bytes to the temporary file. Call before Commit.
  absl::Status Append(std::string_view bytes);
  // Syncs the bytes appended so far, so that Commit has only them to sync
  // again (done apart, on other threads, while other work goes on).
  absl::Status Sync();
  // Syncs, renames onto the final path and syncs its directory. Call once;
  // on failure the temporary file is removed and the path is untouched.
  absl::Status Commit();

  const std::string& path() const { return path_; }
  const std::string& temp_path() const { return temp_path_; }

 private:
  AtomicFile(std::string path, std::string temp_path, FileSystem* fs, bool replace,
             std::unique_ptr<AppendFile> file);
  void Discard();

  std::string path_;
  std::string temp_path_;
  FileSystem* fs_;
  bool replace_;
  std::unique_ptr<AppendFile> file_;  // null once closed
  bool committed_ = false;
};

// Writes `bytes` to `path` through an AtomicFile.
absl::Status WriteFileAtomically(const std::string& path, std::string_view bytes, FileSystem* fs,
                                 bool replace = true);

}  // namespace kindred::io

#endif  // KINDRED_IO_ATOMIC_FILE_H_
