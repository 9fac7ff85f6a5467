// GzipStream: gzip members decompressed whole by libdeflate, or streamed by
// zlib.
#include "io/gzip_stream.h"

#include <libdeflate.h>
#include <zlib.h>

#include <algorithm>
#include <cstring>
#include <deque>
#include <utility>
#include <vector>

#include "absl/strings/str_format.h"

namespace kindred::io {
namespace {

constexpr size_t kRecentMembers = 4096;

// A growable buffer that is not zero-filled: a stream opened for one
// record of a second reading pays only for the bytes it touches.
class Buffer {
 public:
  explicit Buffer(size_t size = 0) { Resize(size, 0); }
  unsigned char* data() { return data_.get(); }
  size_t size() const { return size_; }
  bool empty() const { return size_ == 0; }
  // Keeps the first `keep` bytes.
  void Resize(size_t size, size_t keep) {
    std::unique_ptr<unsigned char[]> bigger(new unsigned char[size]);
    if (keep > 0) std::memcpy(bigger.get(), data_.get(), keep);
    data_ = std::move(bigger);
    size_ = size;
  }

 private:
  std::unique_ptr<unsigned char[]> data_;
  size_t size_ = 0;
};

class GzipStream : public ByteStream {
 public:
  GzipStream(std::unique_ptr<ByteStream> raw, std::string name)
      : raw_(std::move(raw)),
        name_(std::move(name)),
        in_(kChunkBytes),
        decompressor_(libdeflate_alloc_decompressor()) {
    std::memset(&z_, 0, sizeof(z_));
    init_result_ = inflateInit2(&z_, 15 + 32);
  }
  ~GzipStream() override {
    inflateEnd(&z_);
    if (decompressor_ != nullptr) libdeflate_free_decompressor(decompressor_);
  }

  absl::StatusOr<size_t> Read(char* dst, size_t capacity) override;

  uint64_t RawOffsetOf(uint64_t decoded) override {
    while (!members_.empty() && members_.front().first < decoded) members_.pop_front();
    if (members_.empty() || members_.front().first != decoded) return kNoRawOffset;
    return members_.front().second;
  }

 private:
  size_t Buffered() const { return in_end_ - in_pos_; }
  uint64_t RawPosition() const { return total_ - Buffered(); }
  // Appends raw bytes to the input buffer, growing it to `room` free bytes
  // when needed. False at the end of the raw stream.
  absl::StatusOr<bool> ReadMore(size_t room);
  // Decompresses the member at in_pos_ whole into out_ when it can. False:
  // the member is left for zlib, from its first byte.
  absl::StatusOr<bool> TryWholeMember();
  absl::StatusOr<size_t> Inflate(char* dst, size_t capacity);
  void NoteMemberStart() {
    if (members_.size() == kRecentMembers) members_.pop_front();
    members_.emplace_back(decoded_, RawPosition());
  }

  std::unique_ptr<ByteStream> raw_;
  std::string name_;
  Buffer in_;
  size_t in_pos_ = 0, in_end_ = 0;
  bool eof_ = false;
  uint64_t total_ = 0;    // raw bytes read
  uint64_t decoded_ = 0;  // decoded bytes made
  Buffer out_;            // a member decoded whole
  size_t out_pos_ = 0, out_end_ = 0;
  libdeflate_decompressor* decompressor_;
  z_stream z_;
  int init_result_;
  bool started_ = false;                               // a member was begun
  bool in_member_ = false;                             // zlib is inside a member
  std::deque<std::pair<uint64_t, uint64_t>> members_;  // (decoded, raw) starts
};

absl::StatusOr<bool> GzipStream::ReadMore(size_t room) {
  if (eof_) return false;
  if (in_pos_ > 0) {
    std::memmove(in_.data(), in_.data() + in_pos_, Buffered());
    in_end_ -= in_pos_;
    in_pos_ = 0;
  }
  if (in_.size() - in_end_ < room) in_.Resize(in_end_ + room, in_end_);
  absl::StatusOr<size_t> n =
      raw_->Read(reinterpret_cast<char*>(in_.data() + in_end_), in_.size() - in_end_);
  if (!n.ok()) return n.status();
  if (*n == 0) {
    eof_ = true;
    return false;
  }
  in_end_ += *n;
  total_ += *n;
  return true;
}

absl::StatusOr<bool> GzipStream::TryWholeMember() {
  if (decompressor_ == nullptr) return false;
  for (;;) {
    const unsigned char* p = in_.data() + in_pos_;
    // ID1 ID2 CM=8, no FHCRC and no reserved flag (zlib checks those).
    if (Buffered() >= 18 && (p[0] != 0x1f || p[1] != 0x8b || p[2] != 8 || (p[3] & 0xe2) != 0)) {
      return false;
    }
    if (Buffered() >= 18) {
      if (out_.empty()) out_.Resize(1 << 20, 0);
      size_t used_in = 0, used_out = 0;
      const libdeflate_result result = libdeflate_gzip_decompress_ex(
          decompressor_, p, Buffered(), out_.data(), out_.size(), &used_in, &used_out);
      if (result == LIBDEFLATE_SUCCESS) {
        NoteMemberStart();
        in_pos_ += used_in;
        out_pos_ = 0;
        out_end_ = used_out;
        return true;
      }
      if (result == LIBDEFLATE_INSUFFICIENT_SPACE) {
        if (out_.size() >= kWholeMemberOutput) return false;
        out_.Resize(out_.size() * 2, 0);
        continue;
      }
    }
    // The member may go on past the buffered bytes: read more (doubling
    // what is buffered, so a long member costs few retries).
    if (Buffered() >= kWholeMemberInput) return false;
    absl::StatusOr<bool> more = ReadMore(std::max(kChunkBytes, Buffered()));
    if (!more.ok()) return more.status();
    if (!*more) return false;
  }
}

absl::StatusOr<size_t> GzipStream::Read(char* dst, size_t capacity) {
  if (init_result_ != Z_OK) return absl::InternalError("zlib initialization failed");
  for (;;) {
    if (out_pos_ < out_end_) {
      const size_t n = std::min(capacity, out_end_ - out_pos_);
      std::memcpy(dst, out_.data() + out_pos_, n);
      out_pos_ += n;
      decoded_ += n;
      return n;
    }
    if (in_member_) return Inflate(dst, capacity);
    if (Buffered() == 0) {
      absl::StatusOr<bool> more = ReadMore(kChunkBytes);
      if (!more.ok()) return more.status();
      // A clean end after a complete member; no member at all is an error.
      if (!*more && started_) return 0;
    }
    started_ = true;
    if (Buffered() > 0) {
      absl::StatusOr<bool> whole = TryWholeMember();
      if (!whole.ok()) return whole.status();
      if (*whole) continue;
    }
    NoteMemberStart();
    inflateReset(&z_);
    in_member_ = true;
  }
}

// zlib inflates the current member into dst.
absl::StatusOr<size_t> GzipStream::Inflate(char* dst, size_t capacity) {
  for (;;) {
    bool has_data = Buffered() > 0;
    if (!has_data) {
      absl::StatusOr<bool> more = ReadMore(kChunkBytes);
      if (!more.ok()) return more.status();
      has_data = *more;
    }
    z_.next_in = in_.data() + in_pos_;
    z_.avail_in = static_cast<uInt>(std::min<size_t>(Buffered(), 1u << 30));
    z_.next_out = reinterpret_cast<unsigned char*>(dst);
    z_.avail_out = static_cast<uInt>(std::min<size_t>(capacity, 1u << 30));
    const uInt out_before = z_.avail_out;
    const int result = inflate(&z_, Z_NO_FLUSH);
    in_pos_ = static_cast<size_t>(z_.next_in - in_.data());
    const size_t produced = out_before - z_.avail_out;
    decoded_ += produced;
    if (result == Z_STREAM_END) {
      in_member_ = false;
    } else if (result != Z_OK && result != Z_BUF_ERROR) {
      return absl::InvalidArgumentError(
          absl::StrFormat("%s: corrupt gzip stream near byte %d: %s", name_, RawPosition(),
                          z_.msg != nullptr ? z_.msg : zError(result)));
    }
    if (produced > 0) return produced;
    if (!in_member_) return Read(dst, capacity);
    if (!has_data) {
      return absl::InvalidArgumentError(
          absl::StrFormat("%s: truncated gzip stream after %d bytes", name_, total_));
    }
  }
}

}  // namespace

std::unique_ptr<ByteStream> MakeGzipStream(std::unique_ptr<ByteStream> raw, std::string name) {
  return std::make_unique<GzipStream>(std::move(raw), std::move(name));
}

}  // namespace kindred::io
