// Internal: a buffer over a ByteStream that hands out lines, or the whole
// rest of the stream, within a size limit.
//
// Not thread-safe.
#ifndef KINDRED_IO_BUFFERED_INPUT_H_
#define KINDRED_IO_BUFFERED_INPUT_H_

#include <cstdint>
#include <memory>
#include <string>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "core/block_arena.h"
#include "io/byte_stream.h"

namespace kindred::io {

// True when `line` holds only JSON whitespace (space, tab, CR): such lines
// of JSON Lines input make no document.
bool IsBlankLine(absl::string_view line);

class BufferedInput {
 public:
  // `name` is used in messages; lines and the rest of the stream may hold at
  // most `max_bytes` bytes (a line's length excludes its "\n"). Memory is at
  // most about max_bytes + kChunkBytes.
  BufferedInput(std::unique_ptr<ByteStream> stream, std::string name, uint64_t max_bytes);

  // The next line, without its "\n" (a "\r" before it stays). *terminated
  // says whether a "\n" ended it (false only for a last line without one).
  // The view is valid until the next call. Returns false at the end.
  absl::StatusOr<bool> NextLine(absl::string_view* line, bool* terminated);
  // 1-based number of the last line returned.
  uint64_t line_number() const { return line_number_; }
  // Offset in the stream of the first byte of the last line returned.
  uint64_t line_offset() const { return line_offset_; }

  // The first byte that is not JSON whitespace, without consuming anything;
  // -1 when there is none within max_bytes.
  absl::StatusOr<int> PeekFirstNonBlank();

  // Appends everything left to *out (cleared first).
  absl::Status ReadRest(std::string* out);

 private:
  // Reads more bytes after end_, compacting or growing the buffer. Returns
  // the number of bytes added (0 at the end of the stream).
  absl::StatusOr<size_t> Fill();

  std::unique_ptr<ByteStream> stream_;
  std::string name_;
  uint64_t max_bytes_;
  HugePageVector<char> buffer_;  // huge pages: filled once, reused
  size_t begin_ = 0;  // first unread byte
  size_t end_ = 0;    // one past the last byte read from the stream
  bool eof_ = false;
  uint64_t line_number_ = 0;
  uint64_t line_offset_ = 0;
  uint64_t dropped_ = 0;  // bytes of the stream before buffer_[0]
};

}  // namespace kindred::io

#endif  // KINDRED_IO_BUFFERED_INPUT_H_
