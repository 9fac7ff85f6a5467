// Test-only: a FileSystem that forwards to another and injects faults, for
// tests of crash safety and full disks (index writers, output files). Each
// mutating call (Append, WriteAt, Sync, Truncate, Rename, Remove,
// SyncDirectoryOf, CreateNew, CreateScratch, CreateDirectories,
// CreateDirectory, and a ScratchFile's Append)
// counts as one step. When the step numbered
// `fail_at` (0-based) comes:
//
// * kCrash: an Append or WriteAt writes only the first half of its bytes,
//   any other step does nothing; that step and every later mutating call
//   fail with WriteFailed (Aborted), as if the process had died there (later
//   cleanup cannot run).
// * kDiskFull: an Append writes the first half of its bytes and fails with
//   DiskFull (ResourceExhausted); later steps succeed unless they append
//   (the disk stays full), so the caller's clean-up (truncate, remove) can
//   run.
// * kSyncFails: the step fails only if it is a Sync; other steps pass.
//
// A scratch file's failed Append names its directory, as the real one does.
//
// Reads (Map, Exists, LockExclusive, a ScratchFile's ReadAt) are never
// failed by steps. Reads of inputs fail on request instead (FailReadsOf,
// FailOpensOf), as an I/O error (EIO) of the real file system reports it:
// BadInput with the system's message "Input/output error".
//
// Not thread-safe, except that a ScratchFile's ReadAt and a ReadableFile's
// ReadAt (which count no step) may be called from several threads at once;
// set the read faults before reading.
#ifndef KINDRED_TESTS_TESTLIB_FAULT_FILE_SYSTEM_H_
#define KINDRED_TESTS_TESTLIB_FAULT_FILE_SYSTEM_H_

#include <atomic>
#include <cstdint>
#include <memory>
#include <string>

#include "kindred/file_io.h"

namespace kindred::testing {

enum class FaultKind { kCrash, kDiskFull, kSyncFails };

class FaultFileSystem : public FileSystem {
 public:
  // Borrows `base`, which must outlive this object. fail_at < 0: no fault.
  // With chunk_bytes > 0, each Append is split into pieces of at most that
  // many bytes, each piece one step (so a crash can fall anywhere).
  FaultFileSystem(FileSystem* base, FaultKind kind, int64_t fail_at, size_t chunk_bytes = 0)
      : base_(base), kind_(kind), fail_at_(fail_at), chunk_bytes_(chunk_bytes) {}

  size_t chunk_bytes() const { return chunk_bytes_; }

  // Mutating steps seen so far (with fail_at < 0, counts a clean run).
  int64_t steps() const { return steps_; }
  // Whether the fault has been injected.
  bool fired() const { return fired_; }

  absl::StatusOr<std::unique_ptr<AppendFile>> OpenAppend(const std::string& path) override;
  absl::StatusOr<std::unique_ptr<AppendFile>> CreateNew(const std::string& path) override;
  absl::StatusOr<std::unique_ptr<MappedFile>> Map(const std::string& path) override {
    return base_->Map(path);
  }
  absl::StatusOr<std::unique_ptr<FileLock>> LockExclusive(const std::string& path) override {
    return base_->LockExclusive(path);
  }
  bool LockStillNamesPath(const FileLock& lock, const std::string& path) override {
    return base_->LockStillNamesPath(lock, path);
  }
  absl::Status Rename(const std::string& from, const std::string& to, bool replace) override;
  absl::Status Remove(const std::string& path) override;
  absl::Status SyncDirectoryOf(const std::string& path) override;
  bool Exists(const std::string& path) override { return base_->Exists(path); }
  absl::StatusOr<std::unique_ptr<ScratchFile>> CreateScratch(const std::string& dir) override;
  absl::StatusOr<std::unique_ptr<ReadableFile>> OpenRead(const std::string& path) override;
  absl::StatusOr<FileInfo> Stat(const std::string& path) override;
  absl::StatusOr<DirectoryListing> ListDirectory(const std::string& path,
                                                 bool follow_links) override;
  absl::Status CreateDirectories(const std::string& path) override;
  absl::Status CreateDirectory(const std::string& path) override;

  // Files whose path ends in `suffix`, from their `from_open`-th opening
  // on (0: the first; 1: the second, a second reading), fail every read
  // that reaches past byte `after_bytes` ("<path>: read failed:
  // Input/output error" for a read at the position, which first returns
  // the bytes before the limit; "<path>: cannot read: ..." for a read at an
  // offset). Opens succeed.
  void FailReadsOf(std::string suffix, uint64_t after_bytes, int64_t from_open = 0) {
    read_suffix_ = std::move(suffix);
    read_limit_ = after_bytes;
    read_from_open_ = from_open;
  }
  // Opening a file, listing a directory or asking what a path is fails for
  // paths ending in `suffix` ("<path>: cannot open: Input/output error",
  // "<path>: cannot read directory: ...").
  void FailOpensOf(std::string suffix) { open_suffix_ = std::move(suffix); }
  // Reads that failed on request so far.
  int64_t read_faults() const { return read_faults_; }
  void CountReadFault() { ++read_faults_; }

  // One mutating step. Returns what the step must do.
  enum class Verdict { kProceed, kHalfThenFail, kFail };
  // An overwrite (WriteAt) is torn like an append by a crash but needs no
  // space on a full disk.
  Verdict NextStep(bool is_append, bool is_sync, bool is_overwrite = false);
  absl::Status FaultStatus() const;

 private:
  FileSystem* base_;
  FaultKind kind_;
  int64_t fail_at_;
  size_t chunk_bytes_;
  int64_t steps_ = 0;
  bool fired_ = false;
  std::string read_suffix_, open_suffix_;
  uint64_t read_limit_ = 0;
  int64_t read_from_open_ = 0;
  std::atomic<int64_t> read_opens_{0};  // openings of files ending in read_suffix_
  std::atomic<int64_t> read_faults_{0};
};

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_FAULT_FILE_SYSTEM_H_
