// Shared helpers of the fuzz targets: a scratch file that holds the current
// input (for APIs that read paths) and a check that aborts with a message, so
// that a broken property is reported as a finding like a crash.
//
// Not thread-safe: libFuzzer calls a target from one thread.
#ifndef KINDRED_TESTS_FUZZ_FUZZ_UTIL_H_
#define KINDRED_TESTS_FUZZ_FUZZ_UTIL_H_

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

namespace kindred::fuzz {

// Prints "property failed: <what>" on stderr and aborts when !ok.
void Require(bool ok, std::string_view what);

// Writes `data` to this process's scratch file (created on first use under
// $TMPDIR, or /tmp, named after `suffix`, removed at exit) and returns its
// path. The same path is reused by every call with the same suffix.
const std::string& WriteScratch(const uint8_t* data, size_t size, std::string_view suffix);

}  // namespace kindred::fuzz

#endif  // KINDRED_TESTS_FUZZ_FUZZ_UTIL_H_
