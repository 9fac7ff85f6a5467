// Internal: walks a directory tree and lists its regular files in byte-wise
// sorted order of their relative paths, without recursion.
//
// Symbolic links (to files or directories) and special files are skipped.
// Sorting each directory's entries with "/" appended to the names of
// subdirectories and walking depth-first gives exactly the byte-wise order of
// the full relative paths ("a-b" < "a/c" because '-' < '/').
//
// Not thread-safe. Memory: the sorted entries of each directory on the
// current path.
#ifndef KINDRED_IO_TREE_WALKER_H_
#define KINDRED_IO_TREE_WALKER_H_

#include <cstddef>
#include <string>
#include <vector>

#include "absl/status/statusor.h"

namespace kindred::io {

class TreeWalker {
 public:
  // `root` is a directory path; trailing slashes are ignored.
  explicit TreeWalker(std::string root);

  // The next regular file: its path relative to the root ('/'-separated) and
  // its full path (root + "/" + relative). Returns false at the end.
  absl::StatusOr<bool> Next(std::string* relative, std::string* full);

 private:
  struct Entry {
    std::string key;  // name, with "/" appended for a directory
    bool is_directory = false;
  };
  struct Level {
    std::string prefix;  // relative path of the directory, "" or ending in "/"
    std::vector<Entry> entries;
    size_t next = 0;
  };
  absl::Status PushDirectory(std::string prefix);

  std::string root_;
  bool started_ = false;
  std::vector<Level> stack_;
};

// `path` without trailing slashes ("/" stays "/").
std::string StripTrailingSlashes(std::string path);

}  // namespace kindred::io

#endif  // KINDRED_IO_TREE_WALKER_H_
