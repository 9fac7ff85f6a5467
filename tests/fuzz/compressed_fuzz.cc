// Fuzz target: the compressed-input reader (gzip members and zstd frames
// detected by content, decoded as a stream, with a decompressed-size limit).
//
// Input: the file's bytes. Besides crashes and hangs, it checks that every
// error names the file and that no more than the limit (plus one read) is
// handed out before the limit error.
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "absl/strings/match.h"
#include "fuzz_util.h"
#include "io/byte_stream.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  using kindred::fuzz::Require;
  constexpr uint64_t kLimit = 1 << 20;
  const std::string& path = kindred::fuzz::WriteScratch(data, size, ".bin");
  kindred::io::DecodeOptions options;
  options.max_decompressed_bytes = kLimit;
  kindred::io::Compression compression;
  auto stream = kindred::io::OpenDecoded(path, options, &compression);
  Require(stream.ok(), "an existing file opens");

  static std::vector<char> buffer(kindred::io::kChunkBytes);
  uint64_t total = 0;
  for (;;) {
    absl::StatusOr<size_t> n = (*stream)->Read(buffer.data(), buffer.size());
    if (!n.ok()) {
      Require(absl::StrContains(n.status().message(), path), "an error names the file");
      break;
    }
    if (*n == 0) break;
    Require(*n <= buffer.size(), "a read fits the buffer");
    total += *n;
    Require(compression == kindred::io::Compression::kNone || total <= kLimit,
            "no decompressed bytes beyond the limit are handed out");
  }
  if (compression == kindred::io::Compression::kNone) {
    Require(total == size, "uncompressed bytes pass through");
  }
  return 0;
}
