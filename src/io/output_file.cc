#include "io/output_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>
#include <zlib.h>
#include <zstd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "io/byte_stream.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

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

absl::Status SyncAndClose(int fd, const std::string& name) {
  if (fsync(fd) != 0) {
    int error = errno;
    close(fd);
    return OutputErrno(error, absl::StrCat(name, ": fsync failed"));
  }
  if (close(fd) != 0) return OutputErrno(errno, absl::StrCat(name, ": close failed"));
  return absl::OkStatus();
}

absl::Status MakeDirectories(const std::string& dir) {
  std::error_code error;
  std::filesystem::create_directories(dir, error);
  if (error) {
    return OutputErrno(error.value(), absl::StrCat(dir, ": cannot create directory"));
  }
  return absl::OkStatus();
}

std::string BaseName(const std::string& path) {
  size_t slash = path.find_last_of('/');
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

}  // namespace

std::string ParentDirectory(const std::string& path) {
  size_t slash = path.find_last_of('/');
  if (slash == std::string::npos) return ".";
  if (slash == 0) return "/";
  return path.substr(0, slash);
}

absl::Status SyncDirectory(const std::string& dir) {
  int fd = open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (fd < 0) return OutputErrno(errno, absl::StrCat(dir, ": cannot open directory"));
  return SyncAndClose(fd, dir);
}

absl::Status CheckRelativePath(absl::string_view relative) {
  bool bad = relative.empty() || relative.front() == '/';
  for (absl::string_view part : absl::StrSplit(relative, '/')) {
    if (part.empty() || part == "." || part == "..") bad = true;
  }
  if (bad) {
    return InvalidRequest(
        absl::StrCat("refusing to write outside the output directory: \"", relative, "\""));
  }
  return absl::OkStatus();
}

// gzip (deflate level 6, RFC 1952 wrapper) or zstd (level 3) or nothing.
struct OutputFile::Encoder {
  enum class Kind { kNone, kGzip, kZstd } kind = Kind::kNone;
  z_stream z{};
  ZSTD_CCtx* zstd = nullptr;
  ~Encoder() {
    if (kind == Kind::kGzip) deflateEnd(&z);
    ZSTD_freeCCtx(zstd);
  }
};

OutputFile::OutputFile(std::string path, std::string temp_path, int fd)
    : path_(std::move(path)),
      temp_path_(std::move(temp_path)),
      fd_(fd),
      encoder_(std::make_unique<Encoder>()) {}

OutputFile::~OutputFile() {
  if (!committed_) {
    close(fd_);
    unlink(temp_path_.c_str());
  }
}

absl::StatusOr<std::unique_ptr<OutputFile>> OutputFile::Create(const std::string& path) {
  const std::string dir = ParentDirectory(path);
  absl::Status made = MakeDirectories(dir);
  if (!made.ok()) return made;
  std::string temp = absl::StrCat(dir, "/.", BaseName(path), ".tmp-XXXXXX");
  int fd = mkostemp(temp.data(), O_CLOEXEC);
  if (fd < 0) return OutputErrno(errno, absl::StrCat(path, ": cannot create"));
  fchmod(fd, 0644);
  std::unique_ptr<OutputFile> file(new OutputFile(path, temp, fd));
  Encoder& encoder = *file->encoder_;
  if (absl::EndsWith(path, ".gz")) {
    encoder.kind = Encoder::Kind::kGzip;
    if (deflateInit2(&encoder.z, 6, Z_DEFLATED, 15 + 16, 8, Z_DEFAULT_STRATEGY) != Z_OK) {
      encoder.kind = Encoder::Kind::kNone;
      return absl::InternalError("zlib initialization failed");
    }
  } else if (absl::EndsWith(path, ".zst") || absl::EndsWith(path, ".zstd")) {
    encoder.kind = Encoder::Kind::kZstd;
    encoder.zstd = ZSTD_createCCtx();
    if (encoder.zstd == nullptr) return absl::InternalError("zstd initialization failed");
    ZSTD_CCtx_setParameter(encoder.zstd, ZSTD_c_compressionLevel, 3);
  }
  return file;
}

absl::Status OutputFile::Flush() {
  absl::Status written = WriteAll(fd_, pending_.data(), pending_.size(), path_);
  pending_.clear();
  return written;
}

absl::Status OutputFile::Encode(absl::string_view bytes, bool finish) {
  Encoder& encoder = *encoder_;
  if (encoder.kind == Encoder::Kind::kNone) {
    pending_.append(bytes.data(), bytes.size());
    return pending_.size() >= kChunkBytes || finish ? Flush() : absl::OkStatus();
  }
  char out[64 * 1024];
  if (encoder.kind == Encoder::Kind::kGzip) {
    z_stream& z = encoder.z;
    z.next_in = reinterpret_cast<Bytef*>(const_cast<char*>(bytes.data()));
    z.avail_in = static_cast<uInt>(bytes.size());
    int result = Z_OK;
    do {
      z.next_out = reinterpret_cast<Bytef*>(out);
      z.avail_out = sizeof(out);
      result = deflate(&z, finish ? Z_FINISH : Z_NO_FLUSH);
      if (result == Z_STREAM_ERROR) return absl::InternalError("gzip compression failed");
      absl::Status written = WriteAll(fd_, out, sizeof(out) - z.avail_out, path_);
      if (!written.ok()) return written;
    } while (z.avail_in > 0 || z.avail_out == 0 || (finish && result != Z_STREAM_END));
    return absl::OkStatus();
  }
  ZSTD_inBuffer in = {bytes.data(), bytes.size(), 0};
  size_t remaining = 0;
  do {
    ZSTD_outBuffer buffer = {out, sizeof(out), 0};
    remaining =
        ZSTD_compressStream2(encoder.zstd, &buffer, &in, finish ? ZSTD_e_end : ZSTD_e_continue);
    if (ZSTD_isError(remaining)) {
      return absl::InternalError(
          absl::StrCat("zstd compression failed: ", ZSTD_getErrorName(remaining)));
    }
    absl::Status written = WriteAll(fd_, out, buffer.pos, path_);
    if (!written.ok()) return written;
  } while (in.pos < in.size || (finish && remaining != 0));
  return absl::OkStatus();
}

absl::Status OutputFile::Append(absl::string_view bytes) {
  if (!bytes.empty()) member_ended_ = false;
  if (encoder_->kind == Encoder::Kind::kNone || bytes.size() >= 4096) return Encode(bytes, false);
  // Small appends to a compressor are gathered first.
  if (pending_.size() + bytes.size() > kChunkBytes) {
    std::string gathered = std::move(pending_);
    pending_.clear();
    absl::Status encoded = Encode(gathered, false);
    if (!encoded.ok()) return encoded;
  }
  pending_.append(bytes.data(), bytes.size());
  return absl::OkStatus();
}

absl::Status OutputFile::EndMember() {
  if (encoder_->kind == Encoder::Kind::kNone) return absl::OkStatus();
  std::string gathered = std::move(pending_);
  pending_.clear();
  absl::Status encoded = Encode(gathered, true);
  if (!encoded.ok()) return encoded;
  if (encoder_->kind == Encoder::Kind::kGzip && deflateReset(&encoder_->z) != Z_OK) {
    return absl::InternalError("gzip compression failed");
  }
  member_ended_ = true;
  return absl::OkStatus();
}

absl::Status OutputFile::Commit() {
  absl::Status status;
  if (encoder_->kind == Encoder::Kind::kNone) {
    status = Flush();
  } else if (member_ended_ && pending_.empty()) {
    status = absl::OkStatus();  // no empty member at the end
  } else {
    std::string gathered = std::move(pending_);
    pending_.clear();
    status = Encode(gathered, true);
  }
  if (!status.ok()) return status;
  committed_ = true;  // the descriptor is closed below, whatever happens
  status = SyncAndClose(fd_, path_);
  if (status.ok() && rename(temp_path_.c_str(), path_.c_str()) != 0) {
    status = OutputErrno(errno, absl::StrCat(path_, ": cannot rename into place"));
  }
  if (!status.ok()) {
    unlink(temp_path_.c_str());
    return status;
  }
  return SyncDirectory(ParentDirectory(path_));
}

CopyTree::CopyTree(std::string dir, std::string temp_dir)
    : dir_(std::move(dir)), temp_dir_(std::move(temp_dir)) {}

CopyTree::~CopyTree() {
  if (committed_) return;
  for (auto it = created_.rbegin(); it != created_.rend(); ++it) {
    remove(absl::StrCat(temp_dir_, "/", *it).c_str());
  }
  rmdir(temp_dir_.c_str());
}

absl::StatusOr<std::unique_ptr<CopyTree>> CopyTree::Create(const std::string& dir) {
  std::string final_dir = dir;
  while (final_dir.size() > 1 && final_dir.back() == '/') final_dir.pop_back();
  const std::string parent = ParentDirectory(final_dir);
  absl::Status made = MakeDirectories(parent);
  if (!made.ok()) return made;
  std::string temp = absl::StrCat(parent, "/.", BaseName(final_dir), ".tmp-XXXXXX");
  if (mkdtemp(temp.data()) == nullptr) {
    return OutputErrno(errno, absl::StrCat(dir, ": cannot create directory"));
  }
  chmod(temp.c_str(), 0755);
  return std::unique_ptr<CopyTree>(new CopyTree(final_dir, temp));
}

absl::Status CopyTree::MakeParents(const std::string& relative) {
  for (size_t slash = relative.find('/'); slash != std::string::npos;
       slash = relative.find('/', slash + 1)) {
    std::string part = relative.substr(0, slash);
    if (mkdir(absl::StrCat(temp_dir_, "/", part).c_str(), 0755) == 0) {
      created_.push_back(std::move(part));
    } else if (errno != EEXIST) {
      return OutputErrno(errno, absl::StrCat(dir_, "/", part, ": cannot create directory"));
    }
  }
  return absl::OkStatus();
}

absl::Status CopyTree::Add(const std::string& relative, const std::string& source) {
  absl::Status checked = CheckRelativePath(relative);
  if (!checked.ok()) return checked;
  checked = MakeParents(relative);
  if (!checked.ok()) return checked;
  const std::string target = absl::StrCat(temp_dir_, "/", relative);
  const std::string shown = absl::StrCat(dir_, "/", relative);
  int fd = open(target.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0644);
  if (fd < 0 && errno == EEXIST) {
    return InvalidRequest(
        absl::StrCat(shown, ": two kept documents would be copied to the same path"));
  }
  if (fd < 0) return OutputErrno(errno, absl::StrCat(shown, ": cannot create"));
  created_.push_back(relative);
  absl::StatusOr<std::unique_ptr<ByteStream>> input = OpenRaw(source);
  absl::Status status = input.status();
  std::string buffer(input.ok() ? kChunkBytes : 0, '\0');
  while (status.ok()) {
    absl::StatusOr<size_t> n = (*input)->Read(buffer.data(), buffer.size());
    if (!n.ok() || *n == 0) {
      status = n.status();
      break;
    }
    status = WriteAll(fd, buffer.data(), *n, shown);
  }
  if (!status.ok()) {
    close(fd);
    return status;
  }
  return SyncAndClose(fd, shown);
}

absl::Status CopyTree::Commit() {
  for (const std::string& part : created_) {
    const std::string path = absl::StrCat(temp_dir_, "/", part);
    struct stat info;
    if (lstat(path.c_str(), &info) == 0 && S_ISDIR(info.st_mode)) {
      absl::Status synced = SyncDirectory(path);
      if (!synced.ok()) return synced;
    }
  }
  absl::Status synced = SyncDirectory(temp_dir_);
  if (!synced.ok()) return synced;
  // rename(2) replaces an empty directory and refuses a non-empty one.
  if (rename(temp_dir_.c_str(), dir_.c_str()) != 0) {
    if (errno == ENOTEMPTY || errno == EEXIST) {
      return InvalidRequest(absl::StrCat(dir_, ": exists and is not empty"));
    }
    return OutputErrno(errno, absl::StrCat(dir_, ": cannot rename into place"));
  }
  committed_ = true;
  return SyncDirectory(ParentDirectory(dir_));
}

}  // namespace kindred::io
