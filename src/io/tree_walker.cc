#include "io/tree_walker.h"

#include <algorithm>
#include <utility>

#include "absl/strings/str_cat.h"

namespace kindred::io {
namespace {

// Whether an entry is walked (a regular file or a directory); anything else
// is counted as skipped.
bool Walked(FileKind kind, TreeCounts* counts) {
  switch (kind) {
    case FileKind::kFile:
    case FileKind::kDirectory:
      return true;
    case FileKind::kLink:
      ++counts->links;
      break;
    case FileKind::kBrokenLink:
      ++counts->broken_links;
      break;
    case FileKind::kFifo:
      ++counts->fifos;
      break;
    case FileKind::kSocket:
      ++counts->sockets;
      break;
    case FileKind::kDevice:
      ++counts->devices;
      break;
    case FileKind::kGone:
      break;
  }
  return false;
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

TreeWalker::TreeWalker(std::string root, bool follow_links, FileSystem* fs)
    : root_(StripTrailingSlashes(std::move(root))),
      follow_links_(follow_links),
      fs_(fs != nullptr ? fs : DefaultFileSystem()) {}

absl::Status TreeWalker::PushDirectory(std::string prefix) {
  std::string path = prefix.empty() ? root_ : absl::StrCat(root_, "/", prefix);
  absl::StatusOr<DirectoryListing> listing = fs_->ListDirectory(path, follow_links_);
  if (!listing.ok()) return listing.status();
  if (!walked_.insert({listing->device, listing->inode}).second) {
    ++counts_.repeated_directories;
    return absl::OkStatus();  // walked already: nothing pushed
  }
  Level level;
  level.prefix = std::move(prefix);
  for (DirectoryEntry& entry : listing->entries) {
    if (!Walked(entry.kind, &counts_)) continue;
    Entry item;
    item.is_directory = entry.kind == FileKind::kDirectory;
    item.key = item.is_directory ? absl::StrCat(entry.name, "/") : std::move(entry.name);
    level.entries.push_back(std::move(item));
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
