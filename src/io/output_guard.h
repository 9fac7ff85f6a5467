// Internal: the checks that keep kept-document outputs away from the inputs.
//
// Paths are compared after resolution: the longest existing leading part of
// a path goes through realpath(3) (so symbolic links and ".." are resolved),
// and the rest, which does not exist yet, is appended as written.
#ifndef KINDRED_IO_OUTPUT_GUARD_H_
#define KINDRED_IO_OUTPUT_GUARD_H_

#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/kept_writer.h"

namespace kindred::io {

// The absolute, resolved form of `path`, which need not exist. A ".."
// after the existing part is InvalidArgument.
absl::StatusOr<std::string> ResolvePath(const std::string& path);

// True when `path` is `dir` or lies under it (both resolved).
bool IsWithin(const std::string& path, const std::string& dir);

// Checks the outputs that the inputs need against the inputs: output files
// must not be inputs nor lie inside an input directory or the copy
// directory; the copy directory must not overlap an input directory, and if
// it exists it must be an empty directory.
absl::Status CheckOutputs(const std::vector<ResolvedInput>& inputs, const KeptOutput& output,
                          bool needs_lines, bool needs_text);

}  // namespace kindred::io

#endif  // KINDRED_IO_OUTPUT_GUARD_H_
