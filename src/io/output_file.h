// Internal: outputs that appear whole or not at all.
//
// OutputFile writes through an AtomicFile (io/atomic_file.h): under a
// temporary name beside its final path, renamed into place on Commit (after
// fsync of the file, then of the directory), through a FileSystem. CopyTree
// builds a directory tree the same way; its files and directories (made,
// renamed, removed) and the files it copies from go through the FileSystem.
// Either one, destroyed without Commit, removes what it wrote.
//
// Not thread-safe.
#ifndef KINDRED_IO_OUTPUT_FILE_H_
#define KINDRED_IO_OUTPUT_FILE_H_

#include <memory>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "io/atomic_file.h"
#include "kindred/file_io.h"

namespace kindred::io {

// A file written whole; gzip-compressed when the path ends in ".gz",
// zstd-compressed when it ends in ".zst" or ".zstd".
class OutputFile {
 public:
  // Creates the missing parent directories and a temporary file beside
  // `path`. Borrows `fs`, which must outlive the object.
  static absl::StatusOr<std::unique_ptr<OutputFile>> Create(const std::string& path,
                                                            FileSystem* fs = DefaultFileSystem());
  ~OutputFile();

  // Appends bytes (compressed on the way). Call before Commit.
  absl::Status Append(absl::string_view bytes);
  // Ends the current gzip member or zstd frame; the next Append starts a
  // new one (nothing for an uncompressed file). Call before Commit.
  absl::Status EndMember();
  // Ends the stream, fsyncs, renames onto the final path and fsyncs the
  // directory. Call once.
  absl::Status Commit();

 private:
  struct Encoder;
  explicit OutputFile(std::unique_ptr<AtomicFile> file);
  absl::Status Encode(absl::string_view bytes, bool finish);
  absl::Status Flush();

  std::unique_ptr<AtomicFile> file_;
  std::unique_ptr<Encoder> encoder_;
  std::string pending_;  // bytes ready for the file
  bool committed_ = false;
  bool member_ended_ = false;  // EndMember and no byte appended since
};

// A directory tree of file copies, built beside its final path.
class CopyTree {
 public:
  // Creates the missing parents of `dir` and a temporary sibling directory.
  // `dir` itself must not exist or be empty (checked again by Commit).
  // Borrows `fs`, which must outlive the object.
  static absl::StatusOr<std::unique_ptr<CopyTree>> Create(const std::string& dir,
                                                          FileSystem* fs = DefaultFileSystem());
  ~CopyTree();

  // Copies the raw bytes of `source` (read through the FileSystem) to
  // `relative` under the tree, creating
  // directories as needed. `relative` must be a relative path without empty,
  // "." or ".." components; two copies to one path are an error.
  absl::Status Add(const std::string& relative, const std::string& source);
  // Renames the tree onto its final path. Call once.
  absl::Status Commit();

 private:
  CopyTree(std::string dir, std::string temp_dir, FileSystem* fs);
  absl::Status MakeParents(const std::string& relative);

  std::string dir_;
  std::string temp_dir_;
  FileSystem* fs_;
  struct Created {
    std::string relative;  // path under temp_dir_
    bool is_directory = false;
  };
  std::vector<Created> created_;  // in creation order
  bool committed_ = false;
};

// OK when `relative` is a relative path without empty, "." or ".."
// components; else InvalidArgument saying the write would leave the output
// directory.
absl::Status CheckRelativePath(absl::string_view relative);

// The directory part of `path` ("." when there is none).
std::string ParentDirectory(const std::string& path);

// fsync of a directory, so that a rename or creation in it is durable.
absl::Status SyncDirectory(const std::string& dir, FileSystem* fs = DefaultFileSystem());

}  // namespace kindred::io

#endif  // KINDRED_IO_OUTPUT_FILE_H_
