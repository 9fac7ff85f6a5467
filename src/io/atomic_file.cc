#include "io/atomic_file.h"

#include <unistd.h>

#include <utility>

#include "absl/strings/str_cat.h"
#include "kindred/temp_files.h"

namespace kindred::io {

AtomicFile::AtomicFile(std::string path, std::string temp_path, FileSystem* fs, bool replace,
                       std::unique_ptr<AppendFile> file)
    : path_(std::move(path)),
      temp_path_(std::move(temp_path)),
      fs_(fs),
      replace_(replace),
      file_(std::move(file)) {
  RegisterTempFile(temp_path_);
}

AtomicFile::~AtomicFile() {
  if (!committed_) Discard();
}

void AtomicFile::Discard() {
  file_.reset();
  fs_->Remove(temp_path_).IgnoreError();
  ForgetTempFile(temp_path_);
}

absl::StatusOr<std::unique_ptr<AtomicFile>> AtomicFile::Create(const std::string& path,
                                                               FileSystem* fs, bool replace) {
  std::string temp = absl::StrCat(path, ".tmp.", getpid());
  auto file = fs->CreateNew(temp);
  if (!file.ok()) return file.status();
  return std::unique_ptr<AtomicFile>(
      new AtomicFile(path, std::move(temp), fs, replace, *std::move(file)));
}

absl::Status AtomicFile::Append(std::string_view bytes) {
  if (file_ == nullptr) return absl::InternalError(absl::StrCat(path_, ": already committed"));
  return file_->Append(bytes);
}

absl::Status AtomicFile::Sync() {
  if (file_ == nullptr) return absl::InternalError(absl::StrCat(path_, ": already committed"));
  return file_->Sync();
}

absl::Status AtomicFile::Commit() {
  if (file_ == nullptr) return absl::InternalError(absl::StrCat(path_, ": already committed"));
  absl::Status status = file_->Sync();
  file_.reset();
  if (status.ok()) status = fs_->Rename(temp_path_, path_, replace_);
  if (!status.ok()) {
    Discard();
    committed_ = true;  // nothing left to remove
    return status;
  }
  committed_ = true;
  ForgetTempFile(temp_path_);
  return fs_->SyncDirectoryOf(path_);
}

absl::Status WriteFileAtomically(const std::string& path, std::string_view bytes, FileSystem* fs,
                                 bool replace) {
  auto file = AtomicFile::Create(path, fs, replace);
  if (!file.ok()) return file.status();
  absl::Status status = (*file)->Append(bytes);
  if (status.ok()) status = (*file)->Commit();
  return status;
}

}  // namespace kindred::io
