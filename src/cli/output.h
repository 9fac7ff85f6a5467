// Helpers the commands share: writing outputs whole, progress on a terminal,
// size options.
#ifndef KINDRED_CLI_OUTPUT_H_
#define KINDRED_CLI_OUTPUT_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/status/statusor.h"

namespace kindred::cli {

// Writes `data` to `path` whole or not at all: a temporary file in the same
// directory, fsync, then rename over `path`. "-" writes to standard output.
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
  // Redraws the line (at most ten times a second).
  void Update(std::string_view line);
  // Erases the line.
  void Clear();

 private:
  bool enabled_;
  bool shown_ = false;
  double last_ = -1;
};

}  // namespace kindred::cli

#endif  // KINDRED_CLI_OUTPUT_H_
