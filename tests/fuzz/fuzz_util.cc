#include "fuzz_util.h"

#include <fcntl.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <map>

namespace kindred::fuzz {
namespace {

// Scratch paths by suffix; removed when the process exits normally.
std::map<std::string, std::string, std::less<>>& ScratchPaths() {
  static auto* paths = new std::map<std::string, std::string, std::less<>>();
  return *paths;
}

void RemoveScratchFiles() {
  for (const auto& [suffix, path] : ScratchPaths()) unlink(path.c_str());
}

std::string MakeScratchPath(std::string_view suffix) {
  const char* dir = std::getenv("TMPDIR");
  std::string pattern = std::string(dir != nullptr && *dir != '\0' ? dir : "/tmp") +
                        "/kindred-fuzz-XXXXXX" + std::string(suffix);
  int fd = mkstemps(pattern.data(), static_cast<int>(suffix.size()));
  if (fd < 0) {
    std::perror("kindred fuzz: mkstemps");
    std::abort();
  }
  close(fd);
  if (ScratchPaths().empty()) std::atexit(RemoveScratchFiles);
  return pattern;
}

}  // namespace

void Require(bool ok, std::string_view what) {
  if (ok) return;
  std::fprintf(stderr, "property failed: %.*s\n", static_cast<int>(what.size()), what.data());
  std::abort();
}

const std::string& WriteScratch(const uint8_t* data, size_t size, std::string_view suffix) {
  auto found = ScratchPaths().find(suffix);
  if (found == ScratchPaths().end()) {
    found = ScratchPaths().emplace(std::string(suffix), MakeScratchPath(suffix)).first;
  }
  const std::string& path = found->second;
  int fd = open(path.c_str(), O_WRONLY | O_TRUNC | O_CLOEXEC);
  Require(fd >= 0, "scratch file opens");
  while (size > 0) {
    ssize_t n = write(fd, data, size);
    Require(n > 0, "scratch file is written");
    data += n;
    size -= static_cast<size_t>(n);
  }
  close(fd);
  return path;
}

}  // namespace kindred::fuzz
