#include "cli/output.h"

#include <sys/resource.h>
#include <unistd.h>

#include <algorithm>

#include <chrono>
#include <cstdio>

#include "absl/strings/ascii.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/plural.h"
#include "io/atomic_file.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"

namespace kindred::cli {

absl::Status WriteOutputFile(const std::string& path, std::string_view data) {
  if (path == "-") {
    if (std::fwrite(data.data(), 1, data.size(), stdout) != data.size() ||
        std::fflush(stdout) != 0) {
      return WriteFailed("cannot write to standard output");
    }
    return absl::OkStatus();
  }
  return Annotate(io::WriteFileAtomically(path, data, DefaultFileSystem()),
                  absl::StrCat("cannot write ", path));
}

absl::StatusOr<uint64_t> ParseByteSize(std::string_view text) {
  absl::string_view digits =
      absl::StripAsciiWhitespace(absl::string_view(text.data(), text.size()));
  uint64_t scale = 1;
  if (!digits.empty()) {
    switch (absl::ascii_toupper(digits.back())) {
      case 'K':
        scale = 1ull << 10;
        break;
      case 'M':
        scale = 1ull << 20;
        break;
      case 'G':
        scale = 1ull << 30;
        break;
      case 'T':
        scale = 1ull << 40;
        break;
      default:
        break;
    }
    if (scale != 1) digits.remove_suffix(1);
  }
  uint64_t value = 0;
  if (!absl::SimpleAtoi(digits, &value) || value > UINT64_MAX / scale) {
    return absl::InvalidArgumentError(absl::StrCat(
        "\"", std::string(text), "\" is not a size (a number with an optional K, M, G or T)"));
  }
  return value * scale;
}

namespace {
double Now() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}
}  // namespace

Progress::Progress(bool quiet) : enabled_(!quiet && isatty(STDERR_FILENO)), start_(Now()) {}

double Progress::Elapsed() const { return Now() - start_; }

Progress::~Progress() { Clear(); }

void Progress::Update(std::string_view line) {
  if (!enabled_) return;
  const double now = Now();
  if (now - last_ < 0.1) return;
  last_ = now;
  std::fprintf(stderr, "\r\033[K%.*s", static_cast<int>(line.size()), line.data());
  std::fflush(stderr);
  shown_ = true;
}

void Progress::Clear() {
  if (!shown_) return;
  std::fprintf(stderr, "\r\033[K");
  std::fflush(stderr);
  shown_ = false;
}

}  // namespace kindred::cli

namespace kindred::cli {

std::string SigningProgress(const SignStats& stats, double seconds) {
  const double megabytes = static_cast<double>(stats.bytes) / 1e6;
  std::string line =
      absl::StrFormat("signing: %s, %.1f MB", Counted(stats.documents, "document"), megabytes);
  if (seconds <= 0.5) return line;
  absl::StrAppendFormat(&line, ", %.1f MB/s", megabytes / seconds);
  if (stats.raw_bytes_total > 0 && stats.raw_bytes > 0) {
    const double done = std::min(
        1.0, static_cast<double>(stats.raw_bytes) / static_cast<double>(stats.raw_bytes_total));
    const auto left = static_cast<long long>(seconds * (1 - done) / done + 0.5);
    absl::StrAppendFormat(&line, ", %.0f%%, about %d:%02d left", done * 100, left / 60, left % 60);
  }
  return line;
}

uint64_t PeakResidentBytes() {
  struct rusage usage;
  if (getrusage(RUSAGE_SELF, &usage) != 0) return 0;
  return static_cast<uint64_t>(usage.ru_maxrss) * 1024;  // Linux reports KiB
}

void PrintThroughput(uint64_t documents, uint64_t bytes, double seconds) {
  seconds = std::max(seconds, 1e-6);
  std::fprintf(stderr,
               "  throughput        %.1f MB/s, %.0f documents/s (%.2f s); peak memory %.0f MB\n",
               static_cast<double>(bytes) / 1e6 / seconds, static_cast<double>(documents) / seconds,
               seconds, static_cast<double>(PeakResidentBytes()) / 1e6);
}

}  // namespace kindred::cli
