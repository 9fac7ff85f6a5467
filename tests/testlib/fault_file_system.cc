#include "testlib/fault_file_system.h"

#include <algorithm>
#include <cerrno>

#include "kindred/errors.h"

namespace kindred::testing {
namespace {

class FaultAppendFile : public AppendFile {
 public:
  FaultAppendFile(FaultFileSystem* owner, std::unique_ptr<AppendFile> base)
      : owner_(owner), base_(std::move(base)) {}

  absl::Status Append(std::string_view bytes) override {
    size_t chunk = owner_->chunk_bytes();
    if (chunk == 0 || bytes.size() <= chunk) return AppendPiece(bytes);
    for (size_t at = 0; at < bytes.size(); at += chunk) {
      absl::Status status = AppendPiece(bytes.substr(at, chunk));
      if (!status.ok()) return status;
    }
    return absl::OkStatus();
  }

  absl::Status AppendPiece(std::string_view bytes) {
    switch (owner_->NextStep(/*is_append=*/true, /*is_sync=*/false)) {
      case FaultFileSystem::Verdict::kProceed:
        return base_->Append(bytes);
      case FaultFileSystem::Verdict::kHalfThenFail:
        base_->Append(bytes.substr(0, bytes.size() / 2)).IgnoreError();
        return owner_->FaultStatus();
      case FaultFileSystem::Verdict::kFail:
        return owner_->FaultStatus();
    }
    return owner_->FaultStatus();
  }

  // A crash here writes the first half of the bytes (a torn in-place write).
  absl::Status WriteAt(uint64_t offset, std::string_view bytes) override {
    switch (owner_->NextStep(false, false, /*is_overwrite=*/true)) {
      case FaultFileSystem::Verdict::kProceed:
        return base_->WriteAt(offset, bytes);
      case FaultFileSystem::Verdict::kHalfThenFail:
        base_->WriteAt(offset, bytes.substr(0, bytes.size() / 2)).IgnoreError();
        return owner_->FaultStatus();
      case FaultFileSystem::Verdict::kFail:
        return owner_->FaultStatus();
    }
    return owner_->FaultStatus();
  }

  absl::Status Sync() override {
    if (owner_->NextStep(false, /*is_sync=*/true) != FaultFileSystem::Verdict::kProceed) {
      return owner_->FaultStatus();
    }
    return base_->Sync();
  }

  absl::Status Truncate(uint64_t size) override {
    if (owner_->NextStep(false, false) != FaultFileSystem::Verdict::kProceed) {
      return owner_->FaultStatus();
    }
    return base_->Truncate(size);
  }

  uint64_t size() const override { return base_->size(); }

 private:
  FaultFileSystem* owner_;
  std::unique_ptr<AppendFile> base_;
};

// A scratch file whose appends are steps; reads pass through.
class FaultScratchFile : public ScratchFile {
 public:
  FaultScratchFile(FaultFileSystem* owner, std::unique_ptr<ScratchFile> base, std::string dir)
      : owner_(owner), base_(std::move(base)), dir_(std::move(dir)) {}

  absl::Status Append(std::string_view bytes) override {
    switch (owner_->NextStep(/*is_append=*/true, /*is_sync=*/false)) {
      case FaultFileSystem::Verdict::kProceed:
        return base_->Append(bytes);
      case FaultFileSystem::Verdict::kHalfThenFail:
        base_->Append(bytes.substr(0, bytes.size() / 2)).IgnoreError();
        break;
      case FaultFileSystem::Verdict::kFail:
        break;
    }
    return Annotate(owner_->FaultStatus(), "scratch directory " + dir_);
  }
  absl::Status ReadAt(uint64_t offset, absl::Span<char> out) const override {
    return base_->ReadAt(offset, out);
  }
  uint64_t size() const override { return base_->size(); }

 private:
  FaultFileSystem* owner_;
  std::unique_ptr<ScratchFile> base_;
  std::string dir_;
};

}  // namespace

FaultFileSystem::Verdict FaultFileSystem::NextStep(bool is_append, bool is_sync,
                                                   bool is_overwrite) {
  int64_t step = steps_++;
  if (fired_) {
    if (kind_ == FaultKind::kCrash) return Verdict::kFail;
    if (kind_ == FaultKind::kDiskFull && is_append) return Verdict::kFail;
    return Verdict::kProceed;
  }
  if (fail_at_ < 0 || step < fail_at_) return Verdict::kProceed;
  if (kind_ == FaultKind::kSyncFails && !is_sync) return Verdict::kProceed;
  if (kind_ == FaultKind::kDiskFull && !is_append) return Verdict::kProceed;
  fired_ = true;
  if (is_overwrite) return kind_ == FaultKind::kCrash ? Verdict::kHalfThenFail : Verdict::kFail;
  return is_append ? Verdict::kHalfThenFail : Verdict::kFail;
}

absl::Status FaultFileSystem::FaultStatus() const {
  switch (kind_) {
    case FaultKind::kCrash:
      return WriteFailed("injected crash");
    case FaultKind::kDiskFull:
      return DiskFull("injected: No space left on device");
    case FaultKind::kSyncFails:
      return WriteFailed("injected: sync failed");
  }
  return WriteFailed("injected fault");
}

absl::StatusOr<std::unique_ptr<AppendFile>> FaultFileSystem::OpenAppend(const std::string& path) {
  if (fired_ && kind_ == FaultKind::kCrash) return FaultStatus();
  auto file = base_->OpenAppend(path);
  if (!file.ok()) return file.status();
  return std::unique_ptr<AppendFile>(new FaultAppendFile(this, *std::move(file)));
}

absl::StatusOr<std::unique_ptr<AppendFile>> FaultFileSystem::CreateNew(const std::string& path) {
  if (NextStep(false, false) != Verdict::kProceed) return FaultStatus();
  auto file = base_->CreateNew(path);
  if (!file.ok()) return file.status();
  return std::unique_ptr<AppendFile>(new FaultAppendFile(this, *std::move(file)));
}

absl::Status FaultFileSystem::Rename(const std::string& from, const std::string& to, bool replace) {
  if (NextStep(false, false) != Verdict::kProceed) return FaultStatus();
  return base_->Rename(from, to, replace);
}

absl::Status FaultFileSystem::Remove(const std::string& path) {
  if (NextStep(false, false) != Verdict::kProceed) return FaultStatus();
  return base_->Remove(path);
}

absl::Status FaultFileSystem::SyncDirectoryOf(const std::string& path) {
  if (NextStep(false, /*is_sync=*/true) != Verdict::kProceed) return FaultStatus();
  return base_->SyncDirectoryOf(path);
}

}  // namespace kindred::testing

namespace kindred::testing {

absl::StatusOr<std::unique_ptr<ScratchFile>> FaultFileSystem::CreateScratch(
    const std::string& dir) {
  if (NextStep(false, false) != Verdict::kProceed) {
    return Annotate(FaultStatus(), "scratch directory " + dir);
  }
  auto file = base_->CreateScratch(dir);
  if (!file.ok()) return file.status();
  return std::unique_ptr<ScratchFile>(new FaultScratchFile(this, *std::move(file), dir));
}

}  // namespace kindred::testing

namespace kindred::testing {
namespace {

bool EndsWith(const std::string& path, const std::string& suffix) {
  return !suffix.empty() && path.size() >= suffix.size() &&
         path.compare(path.size() - suffix.size(), suffix.size(), suffix) == 0;
}

// A readable file whose reads past `limit` fail as an I/O error would.
class FaultReadableFile : public ReadableFile {
 public:
  FaultReadableFile(FaultFileSystem* owner, std::unique_ptr<ReadableFile> base, std::string path,
                    uint64_t limit)
      : owner_(owner), base_(std::move(base)), path_(std::move(path)), limit_(limit) {}

  absl::StatusOr<size_t> Read(absl::Span<char> out) override {
    if (position_ >= limit_) {
      owner_->CountReadFault();
      return InputErrno(EIO, path_ + ": read failed");
    }
    const size_t wanted = static_cast<size_t>(std::min<uint64_t>(out.size(), limit_ - position_));
    absl::StatusOr<size_t> n = base_->Read(out.subspan(0, wanted));
    if (n.ok()) position_ += *n;
    return n;
  }
  absl::StatusOr<size_t> ReadAt(uint64_t offset, absl::Span<char> out) const override {
    if (offset + out.size() > limit_) {
      owner_->CountReadFault();
      return InputErrno(EIO, path_ + ": cannot read");
    }
    return base_->ReadAt(offset, out);
  }
  absl::Status Seek(uint64_t offset) override {
    position_ = offset;
    return base_->Seek(offset);
  }

 private:
  FaultFileSystem* owner_;
  std::unique_ptr<ReadableFile> base_;
  std::string path_;
  uint64_t limit_;
  uint64_t position_ = 0;
};

}  // namespace

absl::StatusOr<std::unique_ptr<ReadableFile>> FaultFileSystem::OpenRead(const std::string& path) {
  if (EndsWith(path, open_suffix_)) return InputErrno(EIO, path + ": cannot open");
  auto file = base_->OpenRead(path);
  if (!file.ok() || !EndsWith(path, read_suffix_) || read_opens_++ < read_from_open_) return file;
  return std::unique_ptr<ReadableFile>(
      new FaultReadableFile(this, *std::move(file), path, read_limit_));
}

absl::StatusOr<FileInfo> FaultFileSystem::Stat(const std::string& path) {
  if (EndsWith(path, open_suffix_)) return InputErrno(EIO, path + ": cannot open");
  return base_->Stat(path);
}

absl::StatusOr<DirectoryListing> FaultFileSystem::ListDirectory(const std::string& path,
                                                                bool follow_links) {
  if (EndsWith(path, open_suffix_)) return InputErrno(EIO, path + ": cannot read directory");
  return base_->ListDirectory(path, follow_links);
}

absl::Status FaultFileSystem::CreateDirectories(const std::string& path) {
  if (NextStep(false, false) != Verdict::kProceed) return FaultStatus();
  return base_->CreateDirectories(path);
}

absl::Status FaultFileSystem::CreateDirectory(const std::string& path) {
  if (NextStep(false, false) != Verdict::kProceed) return FaultStatus();
  return base_->CreateDirectory(path);
}

}  // namespace kindred::testing
