#include "kindred/temp_files.h"

#include <signal.h>
#include <sys/types.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <mutex>
#include <system_error>

#include "absl/strings/numbers.h"
#include "absl/strings/str_format.h"
#include "absl/strings/strip.h"

namespace kindred {
namespace {

constexpr size_t kMaxPath = 4096;

// A fixed table the signal handler can read without allocating. A slot is
// written only while `used` is false, and published by setting it.
struct Slot {
  std::atomic<bool> used{false};
  char path[kMaxPath];
};
Slot slots[kMaxTempFiles];
std::mutex table_mutex;  // serializes register/forget (not the handler)

extern "C" void RemoveTempFilesOnSignal(int signal_number) {
  for (Slot& slot : slots) {
    if (slot.used.load(std::memory_order_acquire)) unlink(slot.path);
  }
  ::signal(signal_number, SIG_DFL);
  ::raise(signal_number);
}

}  // namespace

void RegisterTempFile(const std::string& path) {
  if (path.size() >= kMaxPath) return;
  std::lock_guard<std::mutex> lock(table_mutex);
  for (Slot& slot : slots) {
    if (slot.used.load(std::memory_order_relaxed)) continue;
    std::memcpy(slot.path, path.c_str(), path.size() + 1);
    slot.used.store(true, std::memory_order_release);
    return;
  }
}

void ForgetTempFile(const std::string& path) {
  std::lock_guard<std::mutex> lock(table_mutex);
  for (Slot& slot : slots) {
    if (slot.used.load(std::memory_order_relaxed) && path == slot.path) {
      slot.used.store(false, std::memory_order_release);
    }
  }
}

void InstallTempFileCleanup() {
  static std::once_flag once;
  std::call_once(once, [] {
    struct sigaction action;
    std::memset(&action, 0, sizeof action);
    action.sa_handler = RemoveTempFilesOnSignal;
    sigemptyset(&action.sa_mask);
    sigaction(SIGINT, &action, nullptr);
    sigaction(SIGTERM, &action, nullptr);
  });
}

std::vector<std::string> RemoveStaleTempFiles(const std::string& index) {
  namespace fs = std::filesystem;
  std::vector<std::string> removed;
  const fs::path index_path(index);
  const std::string base = index_path.filename().string();
  fs::path directory = index_path.parent_path();
  if (directory.empty()) directory = ".";
  std::error_code error;
  for (const auto& entry : fs::directory_iterator(directory, error)) {
    const std::string name = entry.path().filename().string();
    absl::string_view rest = name;
    if (!absl::ConsumePrefix(&rest, base)) continue;
    if (!absl::ConsumePrefix(&rest, ".tmp.") && !absl::ConsumePrefix(&rest, ".building.")) {
      continue;
    }
    int pid = 0;
    if (!absl::SimpleAtoi(rest, &pid) || pid <= 0 || pid == getpid()) continue;
    if (kill(pid, 0) == 0 || errno != ESRCH) continue;  // runs (or not ours to know)
    std::error_code size_error, remove_error;
    const uintmax_t bytes = fs::file_size(entry.path(), size_error);
    std::string path = index_path.parent_path().empty() ? name : (directory / name).string();
    if (fs::remove(entry.path(), remove_error)) {
      removed.push_back(absl::StrFormat(
          "removed %s (%u bytes), left by process %d that no longer runs (an interrupted build "
          "or compact)",
          path, size_error ? 0 : bytes, pid));
    }
  }
  return removed;
}

}  // namespace kindred
