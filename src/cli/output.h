// Helpers the commands share: writing outputs whole, progress on a terminal,
// size options.
#ifndef KINDRED_CLI_OUTPUT_H_
#define KINDRED_CLI_OUTPUT_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/signed_corpus.h"

namespace kindred::cli {

// Writes `data` to `path` whole or not at all (io::WriteFileAtomically: a
// temporary file in the same directory, fsync, then rename over `path`).
// "-" writes to standard output. Errors keep their kind (DiskFull, ...).
absl::Status WriteOutputFile(const std::string& path, std::string_view data);

// Parses a byte size: a number with an optional K, M, G or T suffix (powers of
// 1024), e.g. "64M".
absl::StatusOr<uint64_t> ParseByteSize(std::string_view text);

// One-line progress on stderr, redrawn in place; silent unless stderr is a
// terminal and the user did not ask for quiet.
class Progress {
 public:
  explicit Progress(bool quiet);
  ~Progress();
  bool enabled() const { return enabled_; }
  // Seconds since construction.
  double Elapsed() const;
  // Redraws the line (at most ten times a second).
  void Update(std::string_view line);
  // Erases the line.
  void Clear();

 private:
  bool enabled_;
  bool shown_ = false;
  double last_ = -1;
  double start_;
};

// The progress line of signing after `seconds`: documents, megabytes, rate,
// and when the inputs' total size is known the share done and the time left,
// e.g. "signing: 41000 documents, 40.2 MB, 95.3 MB/s, 38%, about 0:12 left".
std::string SigningProgress(const SignStats& stats, double seconds);

// Peak resident memory of this process so far, in bytes.
uint64_t PeakResidentBytes();

// The closing figures of a command that read `documents` documents of
// `bytes` text bytes in `seconds`: "  throughput        95.3 MB/s, 95000
// documents/s (1.05 s); peak memory 68 MB\n", on stderr.
void PrintThroughput(uint64_t documents, uint64_t bytes, double seconds);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_OUTPUT_H_
