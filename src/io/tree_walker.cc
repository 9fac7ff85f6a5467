#include "io/tree_walker.h"

#include <dirent.h>
#include <fcntl.h>
#include <sys/stat.h>

#include <algorithm>
#include <cerrno>
#include <utility>

#include "absl/strings/str_cat.h"

namespace kindred::io {
namespace {

// Regular file, directory, or something to skip (links, devices, ...).
enum class Kind { kFile, kDirectory, kOther };

Kind KindOf(int dir_fd, const dirent& entry) {
  switch (entry.d_type) {
    case DT_REG:
      return Kind::kFile;
    case DT_DIR:
      return Kind::kDirectory;
    case DT_UNKNOWN:
      break;
    default:
      return Kind::kOther;
  }
  struct stat info;
  if (fstatat(dir_fd, entry.d_name, &info, AT_SYMLINK_NOFOLLOW) != 0) return Kind::kOther;
  if (S_ISREG(info.st_mode)) return Kind::kFile;
  if (S_ISDIR(info.st_mode)) return Kind::kDirectory;
  return Kind::kOther;
}

}  // namespace

std::string StripTrailingSlashes(std::string path) {
  while (path.size() > 1 && path.back() == '/') path.pop_back();
  return path;
}

TreeWalker::TreeWalker(std::string root) : root_(StripTrailingSlashes(std::move(root))) {}

absl::Status TreeWalker::PushDirectory(std::string prefix) {
  std::string path = prefix.empty() ? root_ : absl::StrCat(root_, "/", prefix);
  DIR* dir = opendir(path.c_str());
  if (dir == nullptr) {
    return absl::ErrnoToStatus(errno, absl::StrCat(path, ": cannot read directory"));
  }
  Level level;
  level.prefix = std::move(prefix);
  errno = 0;
  while (const dirent* entry = readdir(dir)) {
    absl::string_view name = entry->d_name;
    if (name == "." || name == "..") continue;
    Kind kind = KindOf(dirfd(dir), *entry);
    if (kind == Kind::kOther) continue;
    Entry item;
    item.is_directory = kind == Kind::kDirectory;
    item.key = item.is_directory ? absl::StrCat(name, "/") : std::string(name);
    level.entries.push_back(std::move(item));
  }
  const int read_error = errno;
  closedir(dir);
  if (read_error != 0) {
    return absl::ErrnoToStatus(read_error, absl::StrCat(path, ": cannot read directory"));
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
