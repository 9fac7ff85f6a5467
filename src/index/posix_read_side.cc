#include "index/posix_read_side.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <string_view>
#include <utility>

#include "absl/strings/str_cat.h"
#include "kindred/errors.h"

namespace kindred {
namespace internal {

// An input's failed call: BadInput, "<path>: <what>: <system's message>".
absl::Status ReadErrno(const std::string& path, const char* what, int error) {
  return InputErrno(error, absl::StrCat(path, ": ", what));
}

FileKind KindOfMode(mode_t mode) {
  if (S_ISREG(mode)) return FileKind::kFile;
  if (S_ISDIR(mode)) return FileKind::kDirectory;
  if (S_ISLNK(mode)) return FileKind::kLink;
  if (S_ISFIFO(mode)) return FileKind::kFifo;
  if (S_ISSOCK(mode)) return FileKind::kSocket;
  return FileKind::kDevice;
}

namespace {

class PosixReadFile : public ReadableFile {
 public:
  PosixReadFile(std::string path, int fd) : path_(std::move(path)), fd_(fd) {}
  ~PosixReadFile() override { close(fd_); }

  absl::StatusOr<size_t> Read(absl::Span<char> out) override {
    for (;;) {
      const ssize_t n = read(fd_, out.data(), out.size());
      if (n >= 0) return static_cast<size_t>(n);
      if (errno != EINTR) return ReadErrno(path_, "read failed", errno);
    }
  }

  absl::StatusOr<size_t> ReadAt(uint64_t offset, absl::Span<char> out) const override {
    size_t done = 0;
    while (done < out.size()) {
      const ssize_t n =
          pread(fd_, out.data() + done, out.size() - done, static_cast<off_t>(offset + done));
      if (n < 0 && errno == EINTR) continue;
      if (n < 0) return ReadErrno(path_, "cannot read", errno);
      if (n == 0) break;
      done += static_cast<size_t>(n);
    }
    return done;
  }

  absl::Status Seek(uint64_t offset) override {
    if (lseek(fd_, static_cast<off_t>(offset), SEEK_SET) < 0) {
      return InputErrno(errno, absl::StrCat(path_, ": cannot read at byte ", offset));
    }
    return absl::OkStatus();
  }

 private:
  std::string path_;
  int fd_;
};

// The kind of entry `entry` of the open directory `dir_fd`: from the entry's
// type when the file system gives it, else (and for links) by fstatat.
FileKind KindOfEntry(int dir_fd, const dirent& entry, bool follow_links) {
  switch (entry.d_type) {
    case DT_REG:
      return FileKind::kFile;
    case DT_DIR:
      return FileKind::kDirectory;
    case DT_UNKNOWN:
    case DT_LNK:
      break;
    case DT_FIFO:
      return FileKind::kFifo;
    case DT_SOCK:
      return FileKind::kSocket;
    default:
      return FileKind::kDevice;
  }
  struct stat info;
  if (fstatat(dir_fd, entry.d_name, &info, AT_SYMLINK_NOFOLLOW) != 0) return FileKind::kGone;
  if (!S_ISLNK(info.st_mode) || !follow_links) return KindOfMode(info.st_mode);
  if (fstatat(dir_fd, entry.d_name, &info, 0) != 0) return FileKind::kBrokenLink;
  return KindOfMode(info.st_mode);
}

}  // namespace

std::unique_ptr<ReadableFile> MakePosixReadFile(std::string path, int fd) {
  return std::make_unique<PosixReadFile>(std::move(path), fd);
}

absl::StatusOr<DirectoryListing> ListOpenDirectory(DIR* dir, const std::string& path,
                                                   bool follow_links) {
  DirectoryListing listing;
  struct stat info;
  if (fstat(dirfd(dir), &info) != 0) return ReadErrno(path, "cannot read directory", errno);
  listing.device = static_cast<uint64_t>(info.st_dev);
  listing.inode = static_cast<uint64_t>(info.st_ino);
  for (;;) {
    errno = 0;  // fstatat below may set it: readdir's own error only
    const dirent* entry = readdir(dir);
    if (entry == nullptr) break;
    const std::string_view name = entry->d_name;
    if (name == "." || name == "..") continue;
    listing.entries.push_back({std::string(name), KindOfEntry(dirfd(dir), *entry, follow_links)});
  }
  if (errno != 0) return ReadErrno(path, "cannot read directory", errno);
  return listing;
}

}  // namespace internal

absl::StatusOr<std::string> ReadToEnd(ReadableFile& file) {
  std::string content;
  constexpr size_t kChunk = 64 * 1024;
  for (;;) {
    const size_t have = content.size();
    content.resize(have + kChunk);
    absl::StatusOr<size_t> n = file.Read(absl::MakeSpan(content.data() + have, kChunk));
    if (!n.ok()) return n.status();
    content.resize(have + *n);
    if (*n == 0) return content;
  }
}

}  // namespace kindred
