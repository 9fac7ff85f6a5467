#include "cli/output_checks.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>

#include "absl/strings/str_cat.h"
#include "io/output_file.h"
#include "kindred/errors.h"

namespace kindred::cli {
namespace {

absl::Status CannotWrite(const std::string& path, absl::string_view reason) {
  return WriteFailed(absl::StrCat("cannot write ", path, ": ", reason));
}

// Keeps an invalid name (a name too long, ...) a usage error, as the real
// write reports it.
absl::Status CannotWrite(const std::string& path, const absl::Status& status) {
  if (absl::IsInvalidArgument(status)) return status;
  return CannotWrite(path, status.message());
}

// Creates and removes a temporary file in `dir`.
absl::Status ProbeDirectory(const std::string& dir, const std::string& shown) {
  std::string temp = absl::StrCat(dir.empty() ? "." : dir, "/.kindred-check-XXXXXX");
  int fd = mkostemp(temp.data(), O_CLOEXEC);
  if (fd < 0) return CannotWrite(shown, std::strerror(errno));
  close(fd);
  unlink(temp.c_str());
  return absl::OkStatus();
}

bool IsDirectory(const std::string& path) {
  struct stat info;
  return stat(path.c_str(), &info) == 0 && S_ISDIR(info.st_mode);
}

}  // namespace

absl::Status CheckOutputFile(const std::string& path) {
  if (path.empty() || path == "-") return absl::OkStatus();
  if (IsDirectory(path)) return CannotWrite(path, "is a directory");
  const std::string dir = std::filesystem::path(path).parent_path().string();
  if (!dir.empty() && !IsDirectory(dir)) return CannotWrite(path, "no such directory");
  return ProbeDirectory(dir, path);
}

absl::Status CheckKeptFile(const std::string& path) {
  if (path.empty()) return absl::OkStatus();
  if (IsDirectory(path)) return CannotWrite(path, "is a directory");
  auto file = io::OutputFile::Create(path);  // removed again when destroyed
  if (!file.ok()) return CannotWrite(path, file.status());
  return absl::OkStatus();
}

absl::Status CheckOutputDirectory(const std::string& dir) {
  if (dir.empty()) return absl::OkStatus();
  std::error_code error;
  std::filesystem::create_directories(dir, error);
  if (error) return CannotWrite(dir, error.message());
  return ProbeDirectory(dir, dir);
}

absl::Status CheckCopyDirectory(const std::string& dir) {
  if (dir.empty()) return absl::OkStatus();
  auto tree = io::CopyTree::Create(dir);  // removed again when destroyed
  if (!tree.ok()) return CannotWrite(dir, tree.status());
  return absl::OkStatus();
}

}  // namespace kindred::cli
