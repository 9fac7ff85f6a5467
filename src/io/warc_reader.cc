// WarcReader: record headers and blocks of a WARC stream.
#include "io/warc_reader.h"

#include <algorithm>
#include <cstring>

#include "absl/strings/ascii.h"
#include "absl/strings/escaping.h"
#include "absl/strings/match.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

// Yields `prefix`, then the rest of `inner`.
class PrefixStream : public ByteStream {
 public:
  PrefixStream(std::string prefix, std::unique_ptr<ByteStream> inner)
      : prefix_(std::move(prefix)), inner_(std::move(inner)) {}
  absl::StatusOr<size_t> Read(char* dst, size_t capacity) override {
    if (used_ < prefix_.size()) {
      const size_t n = std::min(capacity, prefix_.size() - used_);
      std::memcpy(dst, prefix_.data() + used_, n);
      used_ += n;
      return n;
    }
    return inner_->Read(dst, capacity);
  }
  // The prefix was read from `inner`: offsets are the same.
  uint64_t RawOffsetOf(uint64_t decoded) override { return inner_->RawOffsetOf(decoded); }

 private:
  std::string prefix_;
  size_t used_ = 0;
  std::unique_ptr<ByteStream> inner_;
};

constexpr absl::string_view kMagic = "WARC/1.";

}  // namespace

absl::StatusOr<bool> SniffWarc(std::unique_ptr<ByteStream>* stream) {
  std::string prefix(kMagic.size(), '\0');
  size_t have = 0;
  while (have < prefix.size()) {
    absl::StatusOr<size_t> n = (*stream)->Read(prefix.data() + have, prefix.size() - have);
    if (!n.ok()) return n.status();
    if (*n == 0) break;
    have += *n;
  }
  prefix.resize(have);
  const bool warc = prefix == kMagic;
  *stream = std::make_unique<PrefixStream>(std::move(prefix), std::move(*stream));
  return warc;
}

absl::string_view WarcHeader::Field(absl::string_view name) const {
  for (const auto& [key, value] : fields) {
    if (absl::EqualsIgnoreCase(key, name)) return value;
  }
  return {};
}

WarcReader::WarcReader(std::unique_ptr<ByteStream> stream, std::string name, WarcLimits limits)
    : stream_(std::move(stream)), name_(std::move(name)), limits_(limits) {
  buffer_.resize(kChunkBytes);
}

std::string WarcReader::Where() const {
  return absl::StrCat(name_, ": record at byte ", record_offset_);
}

absl::StatusOr<size_t> WarcReader::Fill() {
  if (eof_) return 0;
  if (begin_ > 0) {
    std::memmove(buffer_.data(), buffer_.data() + begin_, end_ - begin_);
    consumed_ += begin_;
    end_ -= begin_;
    begin_ = 0;
  }
  if (end_ == buffer_.size()) buffer_.resize(buffer_.size() * 2);
  absl::StatusOr<size_t> n = stream_->Read(buffer_.data() + end_, buffer_.size() - end_);
  if (!n.ok()) return n.status();
  if (*n == 0) eof_ = true;
  end_ += *n;
  return *n;
}

absl::StatusOr<bool> WarcReader::NextLine(absl::string_view* line, uint64_t limit) {
  size_t scanned = begin_;
  for (;;) {
    const char* found =
        static_cast<const char*>(std::memchr(buffer_.data() + scanned, '\n', end_ - scanned));
    if (found != nullptr) {
      size_t stop = found - buffer_.data();
      size_t length = stop - begin_;
      if (length > 0 && buffer_[stop - 1] == '\r') --length;
      if (length > limit) break;
      *line = absl::string_view(buffer_.data() + begin_, length);
      raw_line_ = absl::string_view(buffer_.data() + begin_, stop + 1 - begin_);
      begin_ = stop + 1;
      return true;
    }
    scanned = end_;
    if (end_ - begin_ > limit + 1) break;  // + 1: a CR before the LF
    const size_t before = begin_;
    absl::StatusOr<size_t> n = Fill();
    if (!n.ok()) return n.status();
    scanned -= before - begin_;
    if (*n == 0) {
      if (begin_ == end_) return false;
      return absl::InvalidArgumentError(
          absl::StrCat(Where(), ": the file ends inside a header line"));
    }
  }
  return LimitExceeded(absl::StrCat(Where(), ": a header line is longer than ", limit,
                                    " bytes; this is not a WARC header"));
}

absl::StatusOr<bool> WarcReader::NextHeader(WarcHeader* header) {
  header->fields.clear();
  header->raw.clear();
  absl::string_view line;
  for (;;) {  // skip blank lines between records
    record_offset_ = consumed_ + begin_;
    absl::StatusOr<bool> more = NextLine(&line, limits_.max_line_bytes);
    if (!more.ok()) {
      // A file that ends inside its first line, or whose "line" is too long,
      // says more by what it starts with.
      absl::string_view start(buffer_.data() + begin_, std::min<size_t>(end_ - begin_, 40));
      if (!absl::StartsWith(start, kMagic.substr(0, std::min(start.size(), kMagic.size())))) {
        line = start;
        break;
      }
      return more;
    }
    if (!*more) return false;
    if (!line.empty()) break;
  }
  header->offset = record_offset_;
  header->raw_offset = stream_->RawOffsetOf(record_offset_);
  if (!absl::StartsWith(line, kMagic)) {
    return absl::InvalidArgumentError(
        absl::StrCat(Where(), ": expected a WARC record (\"WARC/1.0\" or \"WARC/1.1\"), found \"",
                     absl::CEscape(line.substr(0, 40)), "\""));
  }
  header->version = std::string(line);
  header->raw.append(raw_line_.data(), raw_line_.size());
  absl::Status parsed = ParseHeader(header);
  if (!parsed.ok()) return parsed;
  block_left_ = header->content_length;
  return true;
}

absl::Status WarcReader::ParseHeader(WarcHeader* header) {
  bool has_length = false;
  absl::string_view line;
  for (;;) {
    absl::StatusOr<bool> more = NextLine(&line, limits_.max_line_bytes);
    if (!more.ok()) return more.status();
    if (!*more) {
      return absl::InvalidArgumentError(absl::StrCat(Where(), ": the file ends inside the header"));
    }
    header->raw.append(raw_line_.data(), raw_line_.size());
    if (header->raw.size() > limits_.max_header_bytes) {
      return LimitExceeded(absl::StrCat(Where(), ": the header is longer than ",
                                        limits_.max_header_bytes, " bytes"));
    }
    if (line.empty()) break;
    if ((line[0] == ' ' || line[0] == '\t') && !header->fields.empty()) {
      absl::StrAppend(&header->fields.back().second, " ", absl::StripAsciiWhitespace(line));
      continue;
    }
    const size_t colon = line.find(':');
    if (colon == absl::string_view::npos || colon == 0) {
      return absl::InvalidArgumentError(absl::StrCat(Where(), ": malformed header line \"",
                                                     absl::CEscape(line.substr(0, 80)), "\""));
    }
    header->fields.emplace_back(std::string(absl::StripAsciiWhitespace(line.substr(0, colon))),
                                std::string(absl::StripAsciiWhitespace(line.substr(colon + 1))));
    if (absl::EqualsIgnoreCase(header->fields.back().first, "Content-Length")) {
      if (!absl::SimpleAtoi(header->fields.back().second, &header->content_length)) {
        return absl::InvalidArgumentError(absl::StrCat(Where(), ": invalid Content-Length \"",
                                                       header->fields.back().second, "\""));
      }
      has_length = true;
    }
  }
  if (!has_length) {
    return absl::InvalidArgumentError(absl::StrCat(Where(), ": no Content-Length"));
  }
  return absl::OkStatus();
}

absl::Status WarcReader::SkipBlock(const std::function<absl::Status(absl::string_view)>& sink) {
  while (block_left_ > 0) {
    if (begin_ == end_) {
      absl::StatusOr<size_t> n = Fill();
      if (!n.ok()) return n.status();
      if (*n == 0) {
        return absl::InvalidArgumentError(
            absl::StrCat(Where(), ": the file ends inside the record's block (", block_left_,
                         " of its Content-Length bytes missing)"));
      }
    }
    const size_t take = static_cast<size_t>(std::min<uint64_t>(block_left_, end_ - begin_));
    if (sink) {
      absl::Status sunk = sink(absl::string_view(buffer_.data() + begin_, take));
      if (!sunk.ok()) return sunk;
    }
    begin_ += take;
    block_left_ -= take;
  }
  return EndOfRecord();
}

absl::Status WarcReader::ReadBlock(std::string* block) {
  block->clear();
  block->reserve(block_left_);
  return SkipBlock([block](absl::string_view bytes) {
    block->append(bytes.data(), bytes.size());
    return absl::OkStatus();
  });
}

// The block is followed by CRLF CRLF; a wrong Content-Length shows here.
absl::Status WarcReader::EndOfRecord() {
  trailer_.clear();
  for (int i = 0; i < 2; ++i) {
    absl::string_view line;
    absl::StatusOr<bool> more = NextLine(&line, 0);
    if (more.ok() && *more) {
      trailer_.append(raw_line_.data(), raw_line_.size());
      continue;
    }
    if (!more.ok() && more.status().code() != absl::StatusCode::kResourceExhausted) {
      return more.status();
    }
    if (more.ok()) {
      return absl::InvalidArgumentError(
          absl::StrCat(Where(), ": the file ends before the CRLF CRLF that closes the record"));
    }
    return absl::InvalidArgumentError(
        absl::StrCat(Where(),
                     ": the record's block is not followed by CRLF CRLF; its "
                     "Content-Length is wrong or the record is damaged"));
  }
  return absl::OkStatus();
}

}  // namespace kindred::io
