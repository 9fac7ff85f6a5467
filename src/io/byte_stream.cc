#include "io/byte_stream.h"

#include <fcntl.h>
#include <unistd.h>
#include <zstd.h>

#include <cerrno>
#include <cstring>
#include <utility>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "io/gzip_stream.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

// Standard input as a ReadableFile: it is no file of a FileSystem (a pipe, a
// terminal), so it stays a read(2) on descriptor 0, sequential only.
class StandardInput : public ReadableFile {
 public:
  absl::StatusOr<size_t> Read(absl::Span<char> out) override {
    for (;;) {
      ssize_t n = read(STDIN_FILENO, out.data(), out.size());
      if (n >= 0) return static_cast<size_t>(n);
      if (errno != EINTR) return InputErrno(errno, "standard input: read failed");
    }
  }
  absl::StatusOr<size_t> ReadAt(uint64_t, absl::Span<char>) const override {
    return absl::InternalError("standard input is read in order only");
  }
  absl::Status Seek(uint64_t) override {
    return absl::InternalError("standard input is read in order only");
  }
};

// Reads a file, first handing out bytes already read from it (`prefix`,
// used to sniff the compression magic).
class FileStream : public ByteStream {
 public:
  FileStream(std::unique_ptr<ReadableFile> file, std::string prefix,
             std::atomic<uint64_t>* counter = nullptr)
      : file_(std::move(file)), prefix_(std::move(prefix)), counter_(counter) {
    if (counter_ != nullptr) counter_->fetch_add(prefix_.size(), std::memory_order_relaxed);
  }

  absl::StatusOr<size_t> Read(char* dst, size_t capacity) override {
    if (prefix_used_ < prefix_.size()) {
      size_t n = std::min(capacity, prefix_.size() - prefix_used_);
      std::memcpy(dst, prefix_.data() + prefix_used_, n);
      prefix_used_ += n;
      return n;
    }
    absl::StatusOr<size_t> n = file_->Read(absl::MakeSpan(dst, capacity));
    if (n.ok() && counter_ != nullptr) counter_->fetch_add(*n, std::memory_order_relaxed);
    return n;
  }
  uint64_t RawOffsetOf(uint64_t decoded) override { return decoded; }

 private:
  std::unique_ptr<ReadableFile> file_;
  std::string prefix_;
  size_t prefix_used_ = 0;
  std::atomic<uint64_t>* counter_;
};

// Feeds a decompressor: holds one chunk of compressed input and counts the
// compressed bytes consumed.
class CompressedInput {
 public:
  explicit CompressedInput(std::unique_ptr<ByteStream> raw)
      : raw_(std::move(raw)), buffer_(kChunkBytes) {}
  // Refills when empty. Returns false at the end of the raw stream.
  absl::StatusOr<bool> EnsureData(const unsigned char** next, size_t* available) {
    if (*available > 0) return true;
    if (eof_) return false;
    absl::StatusOr<size_t> n = raw_->Read(buffer_.data(), buffer_.size());
    if (!n.ok()) return n.status();
    if (*n == 0) {
      eof_ = true;
      return false;
    }
    total_ += *n;
    *next = reinterpret_cast<const unsigned char*>(buffer_.data());
    *available = *n;
    return true;
  }
  bool eof() const { return eof_; }
  uint64_t total() const { return total_; }

 private:
  std::unique_ptr<ByteStream> raw_;
  std::vector<char> buffer_;
  bool eof_ = false;
  uint64_t total_ = 0;
};

// zstd frames, one after another (RFC 8878), by ZSTD_decompressStream.
class ZstdStream : public ByteStream {
 public:
  ZstdStream(std::unique_ptr<ByteStream> raw, std::string name)
      : input_(std::move(raw)), name_(std::move(name)), stream_(ZSTD_createDStream()) {}
  ~ZstdStream() override { ZSTD_freeDStream(stream_); }

  absl::StatusOr<size_t> Read(char* dst, size_t capacity) override {
    if (stream_ == nullptr) return absl::InternalError("zstd initialization failed");
    for (;;) {
      const unsigned char* next = static_cast<const unsigned char*>(in_.src) + in_.pos;
      size_t available = in_.size - in_.pos;
      absl::StatusOr<bool> has_data = input_.EnsureData(&next, &available);
      if (!has_data.ok()) return has_data.status();
      if (next != static_cast<const unsigned char*>(in_.src) + in_.pos) in_ = {next, available, 0};
      ZSTD_outBuffer out = {dst, capacity, 0};
      const size_t in_before = in_.pos;
      size_t result = ZSTD_decompressStream(stream_, &out, &in_);
      if (ZSTD_isError(result)) {
        return absl::InvalidArgumentError(
            absl::StrFormat("%s: corrupt zstd stream near byte %d: %s", name_,
                            input_.total() - (in_.size - in_.pos), ZSTD_getErrorName(result)));
      }
      // With no input consumed and no output made, the result only hints at
      // the next frame's header: it says nothing about the last frame.
      if (in_.pos != in_before || out.pos > 0) frame_pending_ = result != 0;
      if (out.pos > 0) return out.pos;
      if (!*has_data) {
        if (!frame_pending_) return 0;
        return absl::InvalidArgumentError(
            absl::StrFormat("%s: truncated zstd stream after %d bytes", name_, input_.total()));
      }
    }
  }

 private:
  CompressedInput input_;
  std::string name_;
  ZSTD_DStream* stream_;
  ZSTD_inBuffer in_ = {nullptr, 0, 0};
  bool frame_pending_ = true;
};

// Stops with ResourceExhausted once more than `limit` bytes came out.
class LimitedStream : public ByteStream {
 public:
  LimitedStream(std::unique_ptr<ByteStream> inner, std::string name, uint64_t limit)
      : inner_(std::move(inner)), name_(std::move(name)), limit_(limit) {}
  absl::StatusOr<size_t> Read(char* dst, size_t capacity) override {
    absl::StatusOr<size_t> n = inner_->Read(dst, capacity);
    if (!n.ok()) return n;
    total_ += *n;
    if (total_ > limit_) {
      return LimitExceeded(absl::StrFormat(
          "%s: decompressed size exceeds the limit of %d bytes (--max-decompressed-size)", name_,
          limit_));
    }
    return n;
  }
  uint64_t RawOffsetOf(uint64_t decoded) override { return inner_->RawOffsetOf(decoded); }

 private:
  std::unique_ptr<ByteStream> inner_;
  std::string name_;
  uint64_t limit_;
  uint64_t total_ = 0;
};

absl::Status WriteAll(int fd, const char* data, size_t size, const std::string& name) {
  while (size > 0) {
    ssize_t n = write(fd, data, size);
    if (n < 0) {
      if (errno == EINTR) continue;
      return OutputErrno(errno, absl::StrCat(name, ": write failed"));
    }
    data += n;
    size -= static_cast<size_t>(n);
  }
  return absl::OkStatus();
}

// Copies every byte read through it into a file.
class TeeStream : public ByteStream {
 public:
  TeeStream(std::unique_ptr<ByteStream> inner, int fd, std::string copy_path)
      : inner_(std::move(inner)), fd_(fd), copy_path_(std::move(copy_path)) {}
  ~TeeStream() override { close(fd_); }
  absl::StatusOr<size_t> Read(char* dst, size_t capacity) override {
    absl::StatusOr<size_t> n = inner_->Read(dst, capacity);
    if (!n.ok()) return n;
    absl::Status written = WriteAll(fd_, dst, *n, copy_path_);
    if (!written.ok()) return written;
    return n;
  }
  // The copy holds the decoded bytes.
  uint64_t RawOffsetOf(uint64_t decoded) override { return decoded; }

 private:
  std::unique_ptr<ByteStream> inner_;
  int fd_;
  std::string copy_path_;
};

// Reads up to 4 bytes (fewer only at the end of the stream).
absl::StatusOr<std::string> ReadMagic(ReadableFile& file) {
  std::string magic(4, '\0');
  size_t have = 0;
  while (have < magic.size()) {
    absl::StatusOr<size_t> n = file.Read(absl::MakeSpan(magic.data() + have, magic.size() - have));
    if (!n.ok()) return n.status();
    if (*n == 0) break;
    have += *n;
  }
  magic.resize(have);
  return magic;
}

FileSystem* Resolved(FileSystem* fs) { return fs != nullptr ? fs : DefaultFileSystem(); }

Compression DetectCompression(const std::string& magic) {
  if (magic.size() >= 2 && magic[0] == '\x1f' && magic[1] == '\x8b') return Compression::kGzip;
  if (magic == std::string("\x28\xb5\x2f\xfd", 4)) return Compression::kZstd;
  return Compression::kNone;
}

}  // namespace

std::string DisplayName(const std::string& path) {
  return path == "-" ? std::string("standard input") : path;
}

absl::StatusOr<std::unique_ptr<ByteStream>> OpenRaw(const std::string& path, FileSystem* fs) {
  absl::StatusOr<std::unique_ptr<ReadableFile>> file = Resolved(fs)->OpenRead(path);
  if (!file.ok()) return file.status();
  return std::make_unique<FileStream>(*std::move(file), std::string());
}

absl::StatusOr<std::unique_ptr<ByteStream>> OpenDecoded(const std::string& path,
                                                        const DecodeOptions& options,
                                                        Compression* compression, uint64_t offset) {
  const std::string name = DisplayName(path);
  std::unique_ptr<ReadableFile> file;
  if (path == "-") {
    file = std::make_unique<StandardInput>();
  } else {
    absl::StatusOr<std::unique_ptr<ReadableFile>> opened =
        Resolved(options.file_system)->OpenRead(path);
    if (!opened.ok()) return opened.status();
    file = *std::move(opened);
    if (offset > 0) {
      if (absl::Status moved = file->Seek(offset); !moved.ok()) return moved;
    }
  }
  absl::StatusOr<std::string> magic = ReadMagic(*file);
  if (!magic.ok()) return magic.status();
  const Compression detected = DetectCompression(*magic);
  if (compression != nullptr) *compression = detected;
  std::unique_ptr<ByteStream> stream =
      std::make_unique<FileStream>(std::move(file), *magic, options.raw_bytes);
  if (detected != Compression::kNone) {
    if (detected == Compression::kGzip) {
      stream = MakeGzipStream(std::move(stream), name);
    } else {
      stream = std::make_unique<ZstdStream>(std::move(stream), name);
    }
    if (options.max_decompressed_bytes > 0) {
      stream =
          std::make_unique<LimitedStream>(std::move(stream), name, options.max_decompressed_bytes);
    }
  }
  if (!options.copy_path.empty()) {
    // Stays a raw open(2): O_TRUNC | O_NOFOLLOW with mode 0600, which no
    // FileSystem call offers (the copy is private scratch, never synced).
    int copy_fd = open(options.copy_path.c_str(),
                       O_WRONLY | O_CREAT | O_TRUNC | O_NOFOLLOW | O_CLOEXEC, 0600);
    if (copy_fd < 0) {
      return OutputErrno(errno, absl::StrCat(options.copy_path, ": cannot create"));
    }
    stream = std::make_unique<TeeStream>(std::move(stream), copy_fd, options.copy_path);
  }
  return stream;
}

}  // namespace kindred::io
