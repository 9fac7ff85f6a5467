// Internal: walks a directory tree and lists its regular files in byte-wise
// sorted order of their relative paths, without recursion.
//
// Symbolic links and special files (FIFOs, sockets, devices) are skipped and
// counted (TreeCounts). With `follow_links`, a link to a regular file is read
// as a file (its id is the link's relative path) and a link to a directory is
// walked as a directory; a directory already walked in this tree (the same
// device and inode, so a link loop or a second link to one place) is
// skipped and counted, so a walk always ends. Broken links are counted.
// Sorting each directory's entries with "/" appended to the names of
// subdirectories and walking depth-first gives exactly the byte-wise order of
// the full relative paths ("a-b" < "a/c" because '-' < '/').
//
// Directories are listed through a FileSystem (kindred/file_io.h).
//
// Not thread-safe. Memory: the sorted entries of each directory on the
// current path.
#ifndef KINDRED_IO_TREE_WALKER_H_
#define KINDRED_IO_TREE_WALKER_H_

#include <cstddef>
#include <cstdint>
#include <set>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/file_io.h"

namespace kindred::io {

// What a walk skipped, so far.
struct TreeCounts {
  uint64_t links = 0;         // symbolic links not followed
  uint64_t broken_links = 0;  // followed links that lead nowhere
  uint64_t repeated_directories = 0;  // directories reached again by a link
  uint64_t fifos = 0, sockets = 0, devices = 0;  // special files
  uint64_t Total() const {
    return links + broken_links + repeated_directories + fifos + sockets + devices;
  }
  void Add(const TreeCounts& other);
};

class TreeWalker {
 public:
  // `root` is a directory path; trailing slashes are ignored. Borrows `fs`
  // (null: DefaultFileSystem()), which must outlive the walker.
  explicit TreeWalker(std::string root, bool follow_links = false, FileSystem* fs = nullptr);

  const TreeCounts& counts() const { return counts_; }

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
  bool follow_links_;
  FileSystem* fs_;
  TreeCounts counts_;
  std::set<std::pair<uint64_t, uint64_t>> walked_;  // (device, inode) of directories
  bool started_ = false;
  std::vector<Level> stack_;
};

// `path` without trailing slashes ("/" stays "/").
std::string StripTrailingSlashes(std::string path);

}  // namespace kindred::io

#endif  // KINDRED_IO_TREE_WALKER_H_
