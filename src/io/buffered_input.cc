#include "io/buffered_input.h"

#include <algorithm>
#include <cstring>
#include <utility>

#include "absl/strings/str_format.h"
#include "kindred/errors.h"

namespace kindred::io {

namespace {
constexpr size_t kFirstReadBytes = 4096;
}  // namespace

bool IsBlankLine(absl::string_view line) {
  return std::all_of(line.begin(), line.end(),
                     [](char c) { return c == ' ' || c == '\t' || c == '\r'; });
}

BufferedInput::BufferedInput(std::unique_ptr<ByteStream> stream, std::string name,
                             uint64_t max_bytes)
    : stream_(std::move(stream)), name_(std::move(name)), max_bytes_(max_bytes) {
  // Room for the first chunk (not touched until read into): buffer_.data()
  // is then never null, which memchr, memmove and string assignment need
  // even for zero bytes.
  buffer_.reserve(kChunkBytes);
}

absl::StatusOr<size_t> BufferedInput::Fill() {
  if (eof_) return 0;
  if (begin_ > 0) {
    dropped_ += begin_;
    std::memmove(buffer_.data(), buffer_.data() + begin_, end_ - begin_);
    end_ -= begin_;
    begin_ = 0;
  }
  if (buffer_.size() - end_ < kChunkBytes) {
    // Grow by doubling (amortized copies), up to what a line of max_bytes_
    // and one chunk need.
    size_t wanted = std::max(end_ + kChunkBytes, buffer_.size() * 2);
    wanted = std::min<uint64_t>(
        wanted, std::max<uint64_t>(end_ + kChunkBytes, max_bytes_ + kChunkBytes + 1));
    buffer_.resize(wanted);
  }
  absl::StatusOr<size_t> n = stream_->Read(buffer_.data() + end_, buffer_.size() - end_);
  if (!n.ok()) return n.status();
  if (*n == 0) eof_ = true;
  end_ += *n;
  return *n;
}

absl::StatusOr<bool> BufferedInput::NextLine(absl::string_view* line, bool* terminated) {
  size_t scanned = begin_;
  for (;;) {
    const char* start = buffer_.data() + scanned;
    const void* newline = std::memchr(start, '\n', end_ - scanned);
    const size_t pending = end_ - begin_;
    if (newline != nullptr || pending > max_bytes_ || eof_) {
      size_t length =
          newline != nullptr
              ? static_cast<size_t>(static_cast<const char*>(newline) - (buffer_.data() + begin_))
              : pending;
      if (newline == nullptr && pending == 0) return false;
      ++line_number_;
      if (length > max_bytes_) {
        return LimitExceeded(
            absl::StrFormat("%s:%d: line longer than the limit of %d bytes (--max-document-size)",
                            name_, line_number_, max_bytes_));
      }
      *line = absl::string_view(buffer_.data() + begin_, length);
      line_offset_ = dropped_ + begin_;
      *terminated = newline != nullptr;
      begin_ += length + (newline != nullptr ? 1 : 0);
      return true;
    }
    scanned = end_ - begin_;  // offset of the unscanned part once compacted
    absl::StatusOr<size_t> added = Fill();
    if (!added.ok()) return added.status();
    scanned += begin_;
  }
}

absl::StatusOr<int> BufferedInput::PeekFirstNonBlank() {
  size_t scanned = begin_;
  for (;;) {
    for (; scanned < end_; ++scanned) {
      char c = buffer_[scanned];
      if (c != ' ' && c != '\t' && c != '\r' && c != '\n') return static_cast<unsigned char>(c);
    }
    if (eof_ || end_ - begin_ > max_bytes_) return -1;
    scanned -= begin_;
    absl::StatusOr<size_t> added = Fill();
    if (!added.ok()) return added.status();
    scanned += begin_;
  }
}

absl::Status BufferedInput::ReadRest(std::string* out) {
  out->assign(buffer_.data() + begin_, end_ - begin_);
  begin_ = end_;
  // Read straight into *out: the document itself is the only large buffer.
  // It grows by doubling from 4 KiB: a tree of small files must not cost a
  // zeroed 256 KiB string per document.
  while (!eof_) {
    if (out->size() > max_bytes_) break;
    size_t old_size = out->size();
    size_t grow =
        std::max<size_t>(kFirstReadBytes, std::min<uint64_t>(old_size, max_bytes_ + 1 - old_size));
    out->resize(old_size + grow);
    absl::StatusOr<size_t> n = stream_->Read(out->data() + old_size, grow);
    if (!n.ok()) return n.status();
    out->resize(old_size + *n);
    if (*n == 0) eof_ = true;
  }
  if (out->size() > max_bytes_) {
    return LimitExceeded(absl::StrFormat(
        "%s: document larger than the limit of %d bytes (--max-document-size)", name_, max_bytes_));
  }
  return absl::OkStatus();
}

}  // namespace kindred::io
