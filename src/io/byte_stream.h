// Internal: streams of bytes read from files or standard input, decompressed
// on the fly when the first bytes show gzip or zstd.
//
// Not thread-safe; one reader per stream.
#ifndef KINDRED_IO_BYTE_STREAM_H_
#define KINDRED_IO_BYTE_STREAM_H_

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "kindred/file_io.h"

namespace kindred::io {

// Size of the read buffers (compressed input and decoded output).
inline constexpr size_t kChunkBytes = 256 * 1024;

enum class Compression { kNone, kGzip, kZstd };

// ByteStream::RawOffsetOf when the place is not known.
inline constexpr uint64_t kNoRawOffset = ~uint64_t{0};

// A source of bytes.
class ByteStream {
 public:
  virtual ~ByteStream() = default;
  // Copies up to `capacity` (>= 1) bytes into `dst`. Returns the number
  // copied; 0 means the end of the stream.
  virtual absl::StatusOr<size_t> Read(char* dst, size_t capacity) = 0;
  // Where the byte that came out at `decoded` (counted from the stream's
  // first byte) can be read again from the file: for bytes passed through,
  // the same offset (counted from where the file was opened); for gzip
  // members, the file offset of the member that starts exactly there, if it
  // started recently; otherwise (zstd, the middle of a member)
  // kNoRawOffset. Calls must come in increasing order of `decoded`.
  virtual uint64_t RawOffsetOf(uint64_t decoded) { return kNoRawOffset; }
};

// The name used in messages: "standard input" for "-", else the path.
std::string DisplayName(const std::string& path);

// Options of OpenDecoded.
struct DecodeOptions {
  // Limit on the decoded size of a compressed stream; 0 = unlimited.
  uint64_t max_decompressed_bytes = 0;
  // When not empty, every decoded byte is also written to this file
  // (created or truncated, mode 0600; a symbolic link there is an error,
  // never followed).
  std::string copy_path;
  // When set, the count of raw bytes read from the file or standard input
  // (compressed bytes for compressed input) is added here as reading goes,
  // for progress reports. May be read from another thread.
  std::atomic<uint64_t>* raw_bytes = nullptr;
  // The file system files are read through (not standard input); null:
  // DefaultFileSystem(). Borrowed for the stream's life.
  FileSystem* file_system = nullptr;
};

// Opens `path` ("-" = standard input) and returns a stream of its decoded
// bytes: gzip (magic 1f 8b, any number of members; io/gzip_stream.h) and
// zstd (magic 28 b5 2f fd, any number of frames) are decompressed, anything
// else passes through. *compression, when not null, receives what was
// detected. A file (not standard input) is read from byte `offset` on, the
// magic looked for there.
absl::StatusOr<std::unique_ptr<ByteStream>> OpenDecoded(const std::string& path,
                                                        const DecodeOptions& options,
                                                        Compression* compression = nullptr,
                                                        uint64_t offset = 0);

// Opens `path` for reading raw bytes (no decompression, "-" not allowed),
// through `fs` (null: DefaultFileSystem()), borrowed for the stream's life.
absl::StatusOr<std::unique_ptr<ByteStream>> OpenRaw(const std::string& path,
                                                    FileSystem* fs = nullptr);

}  // namespace kindred::io

#endif  // KINDRED_IO_BYTE_STREAM_H_
