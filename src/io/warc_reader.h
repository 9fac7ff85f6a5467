// Internal: reading the records of a WARC file (ISO 28500:2017, WARC 1.1,
// and WARC 1.0) from a decoded byte stream.
//
// A record is a version line ("WARC/1.0" or "WARC/1.1"), named header
// fields ("Name: value", CRLF-terminated; continuation lines of WARC 1.0 are
// joined to the field before them), an empty line, a block of exactly
// Content-Length bytes, and two CRLFs. Between records, blank lines (some
// writers add extra CRLFs) are skipped.
//
// Memory is bounded: one header line is at most WarcLimits::max_line_bytes
// and a whole header at most max_header_bytes; a block is read whole only
// when the caller asks for it and it is at most the caller's limit,
// otherwise it is streamed in chunks. Errors are InvalidArgument (or
// ResourceExhausted for a limit) with the message "<file>: record at byte
// <offset>: <what>", the offset counted in the decoded (decompressed) bytes.
//
// Not thread-safe.
#ifndef KINDRED_IO_WARC_READER_H_
#define KINDRED_IO_WARC_READER_H_

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "io/byte_stream.h"

namespace kindred::io {

struct WarcLimits {
  uint64_t max_line_bytes = 64 << 10;   // one header line
  uint64_t max_header_bytes = 1 << 20;  // the whole header block
};

// The header of one record.
struct WarcHeader {
  uint64_t offset = 0;  // decoded offset of the version line
  // Where the record can be read again in the file: the offset of its
  // gzip member when one starts with it, of the record itself in a plain
  // file (ByteStream::RawOffsetOf); kNoRawOffset when not known (zstd, a
  // member holding several records).
  uint64_t raw_offset = kNoRawOffset;
  std::string raw;      // the header bytes as read: version line
                        // through the empty line, line endings
                        // included
  std::string version;  // "WARC/1.0" or "WARC/1.1"
  std::vector<std::pair<std::string, std::string>> fields;  // as read
  uint64_t content_length = 0;

  // The value of the first field named `name` (case-insensitive), or empty.
  absl::string_view Field(absl::string_view name) const;
};

class WarcReader {
 public:
  WarcReader(std::unique_ptr<ByteStream> stream, std::string name, WarcLimits limits = {});

  // Reads the next record's header. False at a clean end of the stream (only
  // blank lines left). Call ReadBlock or SkipBlock before the next call.
  absl::StatusOr<bool> NextHeader(WarcHeader* header);
  // Reads the block of the current record into *block (and the two CRLFs
  // after it). Requires header.content_length <= the caller's limit.
  absl::Status ReadBlock(std::string* block);
  // Streams the block of the current record to `sink` in chunks (nullptr:
  // discards it), then checks the two CRLFs after it.
  absl::Status SkipBlock(const std::function<absl::Status(absl::string_view)>& sink);

  const std::string& name() const { return name_; }
  // The bytes that closed the last block read ("\r\n\r\n" in a valid
  // file), as read.
  const std::string& trailer() const { return trailer_; }
  // The error prefix for the current record: "<file>: record at byte N".
  std::string Where() const;

 private:
  absl::StatusOr<size_t> Fill();  // reads more; returns bytes added
  // The next line (without CRLF or LF); false at the end of the stream.
  absl::StatusOr<bool> NextLine(absl::string_view* line, uint64_t limit);
  absl::Status ParseHeader(WarcHeader* header);
  absl::Status EndOfRecord();

  std::unique_ptr<ByteStream> stream_;
  std::string name_;
  WarcLimits limits_;
  std::string buffer_;
  size_t begin_ = 0, end_ = 0;
  bool eof_ = false;
  uint64_t consumed_ = 0;  // decoded bytes before buffer_[begin_]
  uint64_t record_offset_ = 0;
  uint64_t block_left_ = 0;
  absl::string_view raw_line_;  // the last line with its line ending
  std::string trailer_;
};

// Reads the first bytes of *stream and says whether they start a WARC
// record ("WARC/1."); *stream is replaced by one that still yields every
// byte.
absl::StatusOr<bool> SniffWarc(std::unique_ptr<ByteStream>* stream);

}  // namespace kindred::io

#endif  // KINDRED_IO_WARC_READER_H_
