// The real file system behind kindred::FileSystem: POSIX calls only.
#include <dirent.h>
#include <fcntl.h>
#include <stdio.h>
#include <sys/file.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <system_error>
#include <utility>

#include "absl/strings/str_cat.h"
#include "index/posix_read_side.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"

namespace kindred {
namespace {

// The status of a failed call that reads or opens: its kind follows from the
// code (kindred/errors.h), except for a full disk.
absl::Status ErrnoStatus(const char* what, const std::string& path, int error) {
  std::string message = absl::StrCat(what, " ", path, ": ", std::strerror(error));
  if (error == ENOSPC || error == EDQUOT || error == EFBIG) return DiskFull(message);
  if (error == ENAMETOOLONG) return InvalidRequest(message);  // a usage error
  if (error == ENOENT) return absl::NotFoundError(message);
  if (error == EEXIST || error == ENOTEMPTY) return absl::AlreadyExistsError(message);
  if (error == EACCES || error == EPERM || error == EROFS) {
    return absl::PermissionDeniedError(message);
  }
  return absl::AbortedError(message);
}

// `status` of a call that changes the file system as a write failure
// (DiskFull or WriteFailed), whatever the errno, except that an existing
// target stays AlreadyExists (callers decide what that means).
absl::Status AsWriteFailure(absl::Status status) {
  const ErrorKind kind = KindOf(status);
  if (absl::IsAlreadyExists(status) || kind == ErrorKind::kDiskFull ||
      kind == ErrorKind::kInvalidRequest) {
    return status;
  }
  return WithKind(std::move(status), ErrorKind::kWriteFailed);
}

absl::Status WriteErrnoStatus(const char* what, const std::string& path, int error) {
  return AsWriteFailure(ErrnoStatus(what, path, error));
}

std::string DirectoryOf(const std::string& path) {
  size_t slash = path.rfind('/');
  if (slash == std::string::npos) return ".";
  if (slash == 0) return "/";
  return path.substr(0, slash);
}

class PosixAppendFile : public AppendFile {
 public:
  PosixAppendFile(std::string path, int fd, uint64_t size)
      : path_(std::move(path)), fd_(fd), size_(size) {}
  ~PosixAppendFile() override { close(fd_); }

  absl::Status Append(std::string_view bytes) override {
    while (!bytes.empty()) {
      ssize_t n = pwrite(fd_, bytes.data(), bytes.size(), static_cast<off_t>(size_));
      if (n < 0) {
        if (errno == EINTR) continue;
        return WriteErrnoStatus("cannot write", path_, errno);
      }
      size_ += static_cast<uint64_t>(n);
      bytes.remove_prefix(static_cast<size_t>(n));
    }
    return absl::OkStatus();
  }

  absl::Status WriteAt(uint64_t offset, std::string_view bytes) override {
    if (offset + bytes.size() > size_) {
      return absl::InternalError(absl::StrCat("write beyond the end of ", path_));
    }
    while (!bytes.empty()) {
      ssize_t n = pwrite(fd_, bytes.data(), bytes.size(), static_cast<off_t>(offset));
      if (n < 0) {
        if (errno == EINTR) continue;
        return WriteErrnoStatus("cannot write", path_, errno);
      }
      offset += static_cast<uint64_t>(n);
      bytes.remove_prefix(static_cast<size_t>(n));
    }
    return absl::OkStatus();
  }

  absl::Status Sync() override {
    // fdatasync: the data and what reading it back needs (the size, the
    // block map), not the modification time, whose update would otherwise
    // force a journal commit on every sync of an overwrite.
    if (fdatasync(fd_) != 0) return WriteErrnoStatus("cannot sync", path_, errno);
    return absl::OkStatus();
  }

  absl::Status Truncate(uint64_t size) override {
    if (ftruncate(fd_, static_cast<off_t>(size)) != 0) {
      return WriteErrnoStatus("cannot truncate", path_, errno);
    }
    size_ = size;
    return absl::OkStatus();
  }

  uint64_t size() const override { return size_; }

 private:
  std::string path_;
  int fd_;
  uint64_t size_;
};

// A failed call on a scratch file in `dir`: DiskFull when the disk, the quota
// or the file size limit is full, else WriteFailed (the scratch data is the
// program's own output, whatever the call).
absl::Status ScratchErrno(const std::string& dir, const char* what, int error) {
  std::string message =
      absl::StrCat("scratch directory ", dir, ": cannot ", what, ": ", std::strerror(error));
  if (error == ENOSPC || error == EDQUOT || error == EFBIG) return DiskFull(message);
  return WriteFailed(message);
}

class PosixScratchFile : public ScratchFile {
 public:
  PosixScratchFile(std::string dir, int fd) : dir_(std::move(dir)), fd_(fd) {}
  ~PosixScratchFile() override { close(fd_); }

  absl::Status Append(std::string_view bytes) override {
    while (!bytes.empty()) {
      const ssize_t n = pwrite(fd_, bytes.data(), bytes.size(), static_cast<off_t>(size_));
      if (n < 0) {
        if (errno == EINTR) continue;
        return ScratchErrno(dir_, "write the scratch file", errno);
      }
      size_ += static_cast<uint64_t>(n);
      bytes.remove_prefix(static_cast<size_t>(n));
    }
    return absl::OkStatus();
  }

  absl::Status ReadAt(uint64_t offset, absl::Span<char> out) const override {
    if (offset > size_ || out.size() > size_ - offset) {
      return absl::InternalError(absl::StrCat("scratch directory ", dir_, ": read of ", out.size(),
                                              " bytes at ", offset, " beyond the scratch file's ",
                                              size_));
    }
    for (size_t done = 0; done < out.size();) {
      const ssize_t n =
          pread(fd_, out.data() + done, out.size() - done, static_cast<off_t>(offset + done));
      if (n < 0 && errno == EINTR) continue;
      if (n <= 0) return ScratchErrno(dir_, "read the scratch file back", n < 0 ? errno : EIO);
      done += static_cast<size_t>(n);
    }
    return absl::OkStatus();
  }

  uint64_t size() const override { return size_; }

 private:
  std::string dir_;
  int fd_;
  uint64_t size_ = 0;
};

// A new file in `dir` without a name: O_TMPFILE, or where the file system
// lacks it, a private name (mkostemp) unlinked at once.
absl::StatusOr<int> OpenAnonymous(const std::string& dir) {
  int fd = open(dir.c_str(), O_TMPFILE | O_RDWR | O_CLOEXEC, 0600);
  if (fd >= 0) return fd;
  if (errno != EOPNOTSUPP && errno != EISDIR && errno != EINVAL) {
    return ScratchErrno(dir, "create a scratch file", errno);
  }
  std::string path = absl::StrCat(dir, "/kindred-scratch-XXXXXX");
  fd = mkostemp(path.data(), O_CLOEXEC);
  if (fd < 0) return ScratchErrno(dir, "create a scratch file", errno);
  unlink(path.c_str());  // gone when closed, whatever happens
  return fd;
}

class PosixMappedFile : public MappedFile {
 public:
  PosixMappedFile(void* data, size_t size) : data_(data), size_(size) {}
  ~PosixMappedFile() override {
    if (size_ > 0) munmap(data_, size_);
  }
  std::string_view bytes() const override {
    return std::string_view(static_cast<const char*>(data_), size_);
  }

 private:
  void* data_;
  size_t size_;
};

class PosixFileLock : public FileLock {
 public:
  PosixFileLock(int fd, dev_t dev, ino_t ino) : fd_(fd), dev_(dev), ino_(ino) {}
  ~PosixFileLock() override { close(fd_); }  // closing releases the flock
  bool Names(const struct stat& st) const { return st.st_dev == dev_ && st.st_ino == ino_; }

 private:
  int fd_;
  dev_t dev_;
  ino_t ino_;
};

class PosixFileSystem : public FileSystem {
 public:
  absl::StatusOr<std::unique_ptr<AppendFile>> OpenAppend(const std::string& path) override {
    auto file = Open(path, O_WRONLY | O_CLOEXEC);
    // A missing file is the caller's input (an index to add to); any other
    // refusal is a failed write.
    if (file.ok() || absl::IsNotFound(file.status())) return file;
    return AsWriteFailure(file.status());
  }

  absl::StatusOr<std::unique_ptr<AppendFile>> CreateNew(const std::string& path) override {
    auto file = Open(path, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC);
    if (file.ok()) return file;
    return AsWriteFailure(file.status());
  }

  absl::StatusOr<std::unique_ptr<MappedFile>> Map(const std::string& path) override {
    int fd = open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) return ErrnoStatus("cannot open", path, errno);
    struct stat st;
    if (fstat(fd, &st) != 0) {
      int error = errno;
      close(fd);
      return ErrnoStatus("cannot stat", path, error);
    }
    if (!S_ISREG(st.st_mode)) {
      close(fd);
      return absl::InvalidArgumentError(absl::StrCat(path, " is not a regular file"));
    }
    size_t size = static_cast<size_t>(st.st_size);
    void* data = nullptr;
    if (size > 0) {
      data = mmap(nullptr, size, PROT_READ, MAP_SHARED, fd, 0);
      if (data == MAP_FAILED) {
        int error = errno;
        close(fd);
        return ErrnoStatus("cannot map", path, error);
      }
    }
    close(fd);  // the mapping stays valid
    return std::make_unique<PosixMappedFile>(data, size);
  }

  absl::StatusOr<std::unique_ptr<FileLock>> LockExclusive(const std::string& path) override {
    int fd = open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) return ErrnoStatus("cannot open", path, errno);
    if (flock(fd, LOCK_EX | LOCK_NB) != 0) {
      int error = errno;
      close(fd);
      if (error == EWOULDBLOCK) {
        return IndexBusy(
            absl::StrCat("index ", path, " is in use by another writer; try again later"));
      }
      return ErrnoStatus("cannot lock", path, error);
    }
    struct stat st;
    if (fstat(fd, &st) != 0) {
      int error = errno;
      close(fd);
      return ErrnoStatus("cannot stat", path, error);
    }
    return std::make_unique<PosixFileLock>(fd, st.st_dev, st.st_ino);
  }

  bool LockStillNamesPath(const FileLock& lock, const std::string& path) override {
    struct stat st;
    if (stat(path.c_str(), &st) != 0) return false;
    return static_cast<const PosixFileLock&>(lock).Names(st);
  }

  absl::Status Rename(const std::string& from, const std::string& to, bool replace) override {
    unsigned flags = replace ? 0 : RENAME_NOREPLACE;
    if (renameat2(AT_FDCWD, from.c_str(), AT_FDCWD, to.c_str(), flags) != 0) {
      return WriteErrnoStatus("cannot rename to", to, errno);
    }
    return absl::OkStatus();
  }

  absl::Status Remove(const std::string& path) override {
    if (unlink(path.c_str()) == 0) return absl::OkStatus();
    if (errno == EISDIR && rmdir(path.c_str()) == 0) return absl::OkStatus();
    return WriteErrnoStatus("cannot remove", path, errno);
  }

  absl::Status SyncDirectoryOf(const std::string& path) override {
    std::string dir = DirectoryOf(path);
    int fd = open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (fd < 0) return WriteErrnoStatus("cannot open directory", dir, errno);
    int rc = fsync(fd);
    int error = errno;
    close(fd);
    if (rc != 0) return WriteErrnoStatus("cannot sync directory", dir, error);
    return absl::OkStatus();
  }

  bool Exists(const std::string& path) override {
    struct stat st;
    return stat(path.c_str(), &st) == 0;
  }

  absl::StatusOr<std::unique_ptr<ScratchFile>> CreateScratch(const std::string& dir) override {
    absl::StatusOr<int> fd = OpenAnonymous(dir);
    if (!fd.ok()) return fd.status();
    return std::make_unique<PosixScratchFile>(dir, *fd);
  }

  absl::StatusOr<std::unique_ptr<ReadableFile>> OpenRead(const std::string& path) override {
    for (;;) {
      const int fd = open(path.c_str(), O_RDONLY | O_CLOEXEC);
      if (fd >= 0) return internal::MakePosixReadFile(path, fd);
      if (errno != EINTR) return internal::ReadErrno(path, "cannot open", errno);
    }
  }

  absl::StatusOr<FileInfo> Stat(const std::string& path) override {
    struct stat info;
    if (stat(path.c_str(), &info) != 0) return internal::ReadErrno(path, "cannot open", errno);
    FileInfo result;
    result.kind = internal::KindOfMode(info.st_mode);
    result.size = static_cast<uint64_t>(info.st_size);
    result.device = static_cast<uint64_t>(info.st_dev);
    result.inode = static_cast<uint64_t>(info.st_ino);
    return result;
  }

  absl::StatusOr<DirectoryListing> ListDirectory(const std::string& path,
                                                 bool follow_links) override {
    DIR* dir = opendir(path.c_str());
    if (dir == nullptr) return internal::ReadErrno(path, "cannot read directory", errno);
    absl::StatusOr<DirectoryListing> listing = internal::ListOpenDirectory(dir, path, follow_links);
    closedir(dir);
    return listing;
  }

  absl::Status CreateDirectories(const std::string& path) override {
    std::error_code error;
    std::filesystem::create_directories(path, error);
    if (error) return OutputErrno(error.value(), absl::StrCat(path, ": cannot create directory"));
    return absl::OkStatus();
  }

  absl::Status CreateDirectory(const std::string& path) override {
    if (mkdir(path.c_str(), 0755) == 0) return absl::OkStatus();
    if (errno == EEXIST) {
      return absl::AlreadyExistsError(absl::StrCat(path, ": cannot create directory: exists"));
    }
    return OutputErrno(errno, absl::StrCat(path, ": cannot create directory"));
  }

 private:
  absl::StatusOr<std::unique_ptr<AppendFile>> Open(const std::string& path, int flags) {
    int fd = open(path.c_str(), flags, 0644);
    if (fd < 0) return ErrnoStatus("cannot open", path, errno);
    struct stat st;
    if (fstat(fd, &st) != 0) {
      int error = errno;
      close(fd);
      return ErrnoStatus("cannot stat", path, error);
    }
    return std::make_unique<PosixAppendFile>(path, fd, static_cast<uint64_t>(st.st_size));
  }
};

}  // namespace

FileSystem* DefaultFileSystem() {
  static PosixFileSystem* const file_system = new PosixFileSystem();
  return file_system;
}

}  // namespace kindred
