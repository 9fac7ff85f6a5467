#include "io/tree_walker.h"

#include <dirent.h>
#include <fcntl.h>
#include <sys/stat.h>

#include <algorithm>
#include <cerrno>
#include <utility>

#include "absl/strings/str_cat.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

// Regular file, directory, or something skipped (and counted).
enum class Kind { kFile, kDirectory, kOther };

Kind KindOfMode(mode_t mode, TreeCounts* counts) {
  if (S_ISREG(mode)) return Kind::kFile;
  if (S_ISDIR(mode)) return Kind::kDirectory;
  if (S_ISFIFO(mode)) {
    ++counts->fifos;
  } else if (S_ISSOCK(mode)) {
    ++counts->sockets;
  } else if (S_ISCHR(mode) || S_ISBLK(mode)) {
    ++counts->devices;
  }
  return Kind::kOther;
}

Kind KindOf(int dir_fd, const dirent& entry, bool follow_links, TreeCounts* counts) {
  switch (entry.d_type) {
    case DT_REG:
      return Kind::kFile;
    case DT_DIR:
      return Kind::kDirectory;
    case DT_UNKNOWN:
    case DT_LNK:
      break;
    case DT_FIFO:
      ++counts->fifos;
      return Kind::kOther;
    case DT_SOCK:
      ++counts->sockets;
      return Kind::kOther;
    default:
      ++counts->devices;
      return Kind::kOther;
  }
  struct stat info;
  if (fstatat(dir_fd, entry.d_name, &info, AT_SYMLINK_NOFOLLOW) != 0) return Kind::kOther;
  if (!S_ISLNK(info.st_mode)) return KindOfMode(info.st_mode, counts);
  if (!follow_links) {
    ++counts->links;
    return Kind::kOther;
  }
  if (fstatat(dir_fd, entry.d_name, &info, 0) != 0) {
    ++counts->broken_links;
    return Kind::kOther;
  }
  return KindOfMode(info.st_mode, counts);
}

}  // namespace

std::string StripTrailingSlashes(std::string path) {
  while (path.size() > 1 && path.back() == '/') path.pop_back();
  return path;
}

void TreeCounts::Add(const TreeCounts& other) {
  links += other.links;
  broken_links += other.broken_links;
  repeated_directories += other.repeated_directories;
  fifos += other.fifos;
  sockets += other.sockets;
  devices += other.devices;
}

TreeWalker::TreeWalker(std::string root, bool follow_links)
    : root_(StripTrailingSlashes(std::move(root))), follow_links_(follow_links) {}

absl::Status TreeWalker::PushDirectory(std::string prefix) {
  std::string path = prefix.empty() ? root_ : absl::StrCat(root_, "/", prefix);
  DIR* dir = opendir(path.c_str());
  if (dir == nullptr) {
    return InputErrno(errno, absl::StrCat(path, ": cannot read directory"));
  }
  struct stat info;
  if (fstat(dirfd(dir), &info) == 0 &&
      !walked_.insert({static_cast<uint64_t>(info.st_dev), static_cast<uint64_t>(info.st_ino)})
           .second) {
    closedir(dir);
    ++counts_.repeated_directories;
    return absl::OkStatus();  // walked already: nothing pushed
  }
  Level level;
  level.prefix = std::move(prefix);
  for (;;) {
    errno = 0;  // stat calls below may set it: readdir's own error only
    const dirent* entry = readdir(dir);
    if (entry == nullptr) break;
    absl::string_view name = entry->d_name;
    if (name == "." || name == "..") continue;
    Kind kind = KindOf(dirfd(dir), *entry, follow_links_, &counts_);
    if (kind == Kind::kOther) continue;
    Entry item;
    item.is_directory = kind == Kind::kDirectory;
    item.key = item.is_directory ? absl::StrCat(name, "/") : std::string(name);
    level.entries.push_back(std::move(item));
  }
  const int read_error = errno;
  closedir(dir);
  if (read_error != 0) {
    return InputErrno(read_error, absl::StrCat(path, ": cannot read directory"));
  }
  std::sort(level.entries.begin(), level.entries.end(),
            [](const Entry& a, const Entry& b) { return a.key < b.key; });
  stack_.push_back(std::move(level));
  return absl::OkStatus();
}

absl::StatusOr<bool> TreeWalker::Next(std::string* relative, std::string* full) {
  if (!started_) {
    started_ = true;
    absl::Status pushed = PushDirectory("");
    if (!pushed.ok()) return pushed;
  }
  while (!stack_.empty()) {
    Level& level = stack_.back();
    if (level.next == level.entries.size()) {
      stack_.pop_back();
      continue;
    }
    const Entry& entry = level.entries[level.next++];
    std::string path = absl::StrCat(level.prefix, entry.key);
    if (entry.is_directory) {
      absl::Status pushed = PushDirectory(std::move(path));  // `level` is invalid after this
      if (!pushed.ok()) return pushed;
      continue;
    }
    *full = root_ == "/" ? absl::StrCat("/", path) : absl::StrCat(root_, "/", path);
    *relative = std::move(path);
    return true;
  }
  return false;
}

}  // namespace kindred::io
