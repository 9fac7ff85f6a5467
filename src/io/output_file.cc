#include "io/output_file.h"

#include <unistd.h>
#include <zlib.h>
#include <zstd.h>

#include <atomic>
#include <cstring>
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "io/byte_stream.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

std::string BaseName(const std::string& path) {
  size_t slash = path.find_last_of('/');
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

// Creates a new directory named "<prefix><pid>-<n>" for the first n that is
// free; returns its path. Errors name `shown`.
absl::StatusOr<std::string> CreateUniqueDirectory(const std::string& prefix,
                                                  const std::string& shown, FileSystem* fs) {
  static std::atomic<uint64_t> counter{0};
  for (int attempt = 0;; ++attempt) {
    std::string path = absl::StrCat(prefix, getpid(), "-", counter.fetch_add(1));
    absl::Status made = fs->CreateDirectory(path);
    if (made.ok()) return path;
    if (!absl::IsAlreadyExists(made) || attempt == 1000) return WithPathShownAs(made, path, shown);
  }
}

}  // namespace

std::string ParentDirectory(const std::string& path) {
  size_t slash = path.find_last_of('/');
  if (slash == std::string::npos) return ".";
  if (slash == 0) return "/";
  return path.substr(0, slash);
}

absl::Status SyncDirectory(const std::string& dir, FileSystem* fs) {
  return fs->SyncDirectoryOf(absl::StrCat(dir, "/."));  // syncs `dir` itself
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

OutputFile::OutputFile(std::unique_ptr<AtomicFile> file)
    : file_(std::move(file)), encoder_(std::make_unique<Encoder>()) {}

OutputFile::~OutputFile() = default;  // an uncommitted AtomicFile removes itself

absl::StatusOr<std::unique_ptr<OutputFile>> OutputFile::Create(const std::string& path,
                                                               FileSystem* fs) {
  absl::Status made = fs->CreateDirectories(ParentDirectory(path));
  if (!made.ok()) return made;
  auto atomic = AtomicFile::Create(path, fs);
  if (!atomic.ok()) return atomic.status();
  std::unique_ptr<OutputFile> file(new OutputFile(*std::move(atomic)));
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
  absl::Status written = file_->Append(pending_);
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
      absl::Status written = file_->Append(std::string_view(out, sizeof(out) - z.avail_out));
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
    absl::Status written = file_->Append(std::string_view(out, buffer.pos));
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
  committed_ = true;
  return file_->Commit();
}

CopyTree::CopyTree(std::string dir, std::string temp_dir, FileSystem* fs)
    : dir_(std::move(dir)), temp_dir_(std::move(temp_dir)), fs_(fs) {}

CopyTree::~CopyTree() {
  if (committed_) return;
  for (auto it = created_.rbegin(); it != created_.rend(); ++it) {
    fs_->Remove(absl::StrCat(temp_dir_, "/", it->relative)).IgnoreError();
  }
  fs_->Remove(temp_dir_).IgnoreError();
}

absl::StatusOr<std::unique_ptr<CopyTree>> CopyTree::Create(const std::string& dir, FileSystem* fs) {
  std::string final_dir = dir;
  while (final_dir.size() > 1 && final_dir.back() == '/') final_dir.pop_back();
  const std::string parent = ParentDirectory(final_dir);
  absl::Status made = fs->CreateDirectories(parent);
  if (!made.ok()) return made;
  const std::string prefix = absl::StrCat(parent, "/.", BaseName(final_dir), ".tmp-");
  absl::StatusOr<std::string> temp = CreateUniqueDirectory(prefix, dir, fs);
  if (!temp.ok()) return temp.status();
  return std::unique_ptr<CopyTree>(new CopyTree(final_dir, *std::move(temp), fs));
}

absl::Status CopyTree::MakeParents(const std::string& relative) {
  for (size_t slash = relative.find('/'); slash != std::string::npos;
       slash = relative.find('/', slash + 1)) {
    std::string part = relative.substr(0, slash);
    absl::Status made = fs_->CreateDirectory(absl::StrCat(temp_dir_, "/", part));
    if (made.ok()) {
      created_.push_back({std::move(part), /*is_directory=*/true});
    } else if (!absl::IsAlreadyExists(made)) {
      return WithPathShownAs(made, temp_dir_, dir_);
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
  // Created new (O_EXCL): never through a link planted at the name.
  auto file = fs_->CreateNew(target);
  if (absl::IsAlreadyExists(file.status())) {
    return InvalidRequest(
        absl::StrCat(shown, ": two kept documents would be copied to the same path"));
  }
  if (!file.ok()) return file.status();
  created_.push_back({relative, /*is_directory=*/false});
  absl::StatusOr<std::unique_ptr<ByteStream>> input = OpenRaw(source, fs_);
  absl::Status status = input.status();
  std::string buffer(input.ok() ? kChunkBytes : 0, '\0');
  while (status.ok()) {
    absl::StatusOr<size_t> n = (*input)->Read(buffer.data(), buffer.size());
    if (!n.ok() || *n == 0) {
      status = n.status();
      break;
    }
    status = (*file)->Append(std::string_view(buffer.data(), *n));
  }
  if (status.ok()) status = (*file)->Sync();
  return status;
}

absl::Status CopyTree::Commit() {
  for (const Created& part : created_) {
    if (!part.is_directory) continue;
    absl::Status synced = SyncDirectory(absl::StrCat(temp_dir_, "/", part.relative), fs_);
    if (!synced.ok()) return synced;
  }
  absl::Status synced = SyncDirectory(temp_dir_, fs_);
  if (!synced.ok()) return synced;
  // rename(2) replaces an empty directory and refuses a non-empty one.
  absl::Status renamed = fs_->Rename(temp_dir_, dir_, /*replace=*/true);
  if (absl::IsAlreadyExists(renamed)) {
    return InvalidRequest(absl::StrCat(dir_, ": exists and is not empty"));
  }
  if (!renamed.ok()) {
    // The file system says "cannot rename to <dir>: <reason>"; the message
    // names the tree first, as every other message of the tree does.
    const std::string said = absl::StrCat("cannot rename to ", dir_, ": ");
    absl::string_view reason = renamed.message();
    if (absl::StartsWith(reason, said)) reason.remove_prefix(said.size());
    return WithMessage(renamed, absl::StrCat(dir_, ": cannot rename into place: ", reason));
  }
  committed_ = true;
  return SyncDirectory(ParentDirectory(dir_), fs_);
}

}  // namespace kindred::io
