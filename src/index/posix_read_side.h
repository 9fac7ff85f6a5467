// The read side of the real file system (posix_file_system.cc): files
// read by position and at offsets, kinds of entries, directory listings.
// Internal to the library; POSIX calls only.
#ifndef KINDRED_INDEX_POSIX_READ_SIDE_H_
#define KINDRED_INDEX_POSIX_READ_SIDE_H_

#include <dirent.h>
#include <sys/stat.h>

#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/file_io.h"

namespace kindred::internal {

// An input's failed call: BadInput, "<path>: <what>: <system's message>".
absl::Status ReadErrno(const std::string& path, const char* what, int error);

// A ReadableFile over the open descriptor `fd` (owned, closed at the end),
// named `path` in messages.
std::unique_ptr<ReadableFile> MakePosixReadFile(std::string path, int fd);

// The kind of a file of mode `mode` (from stat).
FileKind KindOfMode(mode_t mode);

// The entries of the open directory `dir` (not closed here), named `path` in
// messages; links followed when `follow_links`.
absl::StatusOr<DirectoryListing> ListOpenDirectory(DIR* dir, const std::string& path,
                                                   bool follow_links);

}  // namespace kindred::internal

#endif  // KINDRED_INDEX_POSIX_READ_SIDE_H_
