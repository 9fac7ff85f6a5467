#include "io/output_guard.h"

#include <dirent.h>
#include <limits.h>
#include <stdlib.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <memory>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

absl::StatusOr<std::string> RealPath(const std::string& path) {
  std::unique_ptr<char, decltype(&free)> resolved(realpath(path.c_str(), nullptr), &free);
  if (resolved == nullptr)
    return OutputErrno(errno, absl::StrCat(path, ": cannot resolve"));
  return std::string(resolved.get());
}

absl::Status Refuse(const std::string& path, absl::string_view reason) {
  return InvalidRequest(absl::StrCat(path, ": ", reason));
}

bool SameFile(const std::string& a, const std::string& b) {
  struct stat first, second;
  return stat(a.c_str(), &first) == 0 && stat(b.c_str(), &second) == 0 &&
         first.st_dev == second.st_dev && first.st_ino == second.st_ino;
}

// OK when `dir` does not exist or is an empty directory.
absl::Status CheckEmptyOrMissing(const std::string& dir) {
  struct stat info;
  if (stat(dir.c_str(), &info) != 0) return absl::OkStatus();
  if (!S_ISDIR(info.st_mode)) return Refuse(dir, "exists and is not a directory");
  DIR* handle = opendir(dir.c_str());
  if (handle == nullptr) return OutputErrno(errno, absl::StrCat(dir, ": cannot read"));
  bool empty = true;
  while (const dirent* entry = readdir(handle)) {
    absl::string_view name = entry->d_name;
    if (name != "." && name != "..") empty = false;
  }
  closedir(handle);
  if (!empty) return Refuse(dir, "the copy directory exists and is not empty");
  return absl::OkStatus();
}

// An output file must not be an input, nor inside an input tree or the copy
// directory.
absl::Status CheckOutputFile(const std::string& path, const std::vector<ResolvedInput>& inputs,
                             const std::vector<std::string>& resolved_inputs,
                             const std::string& copy_dir) {
  absl::StatusOr<std::string> resolved = ResolvePath(path);
  if (!resolved.ok()) return resolved.status();
  struct stat info;
  if (stat(resolved->c_str(), &info) == 0 && S_ISDIR(info.st_mode)) {
    return Refuse(path, "is a directory");
  }
  for (size_t i = 0; i < inputs.size(); ++i) {
    if (inputs[i].is_directory && IsWithin(*resolved, resolved_inputs[i])) {
      return Refuse(path, absl::StrCat("lies inside the input directory ", inputs[i].name));
    }
    if (*resolved == resolved_inputs[i] || SameFile(*resolved, resolved_inputs[i])) {
      return Refuse(path, "is an input; inputs are never overwritten");
    }
  }
  if (!copy_dir.empty() && IsWithin(*resolved, copy_dir)) {
    return Refuse(path, "lies inside the copy directory");
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<std::string> ResolvePath(const std::string& path) {
  std::string absolute = path;
  if (path.empty() || path[0] != '/') {
    char cwd[PATH_MAX];
    if (getcwd(cwd, sizeof(cwd)) == nullptr) return OutputErrno(errno, "getcwd failed");
    absolute = absl::StrCat(cwd, "/", path);
  }
  std::vector<std::string> missing;  // trailing components that do not exist, reversed
  std::string existing = absolute;
  for (;;) {
    absl::StatusOr<std::string> real = RealPath(existing);
    if (real.ok()) {
      std::string result = *real == "/" ? "" : *real;
      for (auto it = missing.rbegin(); it != missing.rend(); ++it) {
        if (*it == "..") return Refuse(path, "\"..\" after a directory that does not exist");
        if (*it != "." && !it->empty()) absl::StrAppend(&result, "/", *it);
      }
      return result.empty() ? "/" : result;
    }
    size_t slash = existing.find_last_of('/');
    if (slash == std::string::npos || existing == "/") return real.status();
    missing.push_back(existing.substr(slash + 1));
    existing = slash == 0 ? "/" : existing.substr(0, slash);
  }
}

bool IsWithin(const std::string& path, const std::string& dir) {
  if (dir == "/") return true;
  return path == dir || (path.size() > dir.size() && path.compare(0, dir.size(), dir) == 0 &&
                         path[dir.size()] == '/');
}

absl::Status CheckOutputs(const std::vector<ResolvedInput>& inputs, const KeptOutput& output,
                          bool needs_lines, bool needs_text) {
  std::vector<std::string> resolved_inputs;
  for (const ResolvedInput& input : inputs) {
    if (input.read_path.empty()) {
      resolved_inputs.emplace_back();
      continue;
    }
    absl::StatusOr<std::string> real = RealPath(input.read_path);
    if (!real.ok()) return real.status();
    resolved_inputs.push_back(*real);
  }
  std::string copy_dir;
  if (needs_text && !output.copy_dir.empty()) {
    absl::StatusOr<std::string> resolved = ResolvePath(output.copy_dir);
    if (!resolved.ok()) return resolved.status();
    copy_dir = *resolved;
    for (size_t i = 0; i < inputs.size(); ++i) {
      if (resolved_inputs[i].empty()) continue;
      if (IsWithin(copy_dir, resolved_inputs[i]) || IsWithin(resolved_inputs[i], copy_dir)) {
        return Refuse(output.copy_dir,
                      absl::StrCat("the copy directory overlaps the input ", inputs[i].name));
      }
    }
    absl::Status empty = CheckEmptyOrMissing(copy_dir);
    if (!empty.ok()) return empty;
  }
  if (needs_lines) {
    absl::Status checked = CheckOutputFile(output.lines_path, inputs, resolved_inputs, copy_dir);
    if (!checked.ok()) return checked;
  }
  if (needs_text && !output.path_list.empty()) {
    absl::Status checked = CheckOutputFile(output.path_list, inputs, resolved_inputs, copy_dir);
    if (!checked.ok()) return checked;
  }
  return absl::OkStatus();
}

}  // namespace kindred::io
