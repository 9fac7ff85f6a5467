// Test-only: a FileSystem that forwards to another and injects faults, for
// tests of crash safety and full disks (index writers, output files). Each
// mutating call (Append, WriteAt, Sync, Truncate, Rename, Remove,
// SyncDirectoryOf, CreateNew, CreateScratch, and a ScratchFile's Append)
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
// failed. Not thread-safe, except that a ScratchFile's ReadAt (which counts
// no step) may be called from several threads at once.
#ifndef KINDRED_TESTS_TESTLIB_FAULT_FILE_SYSTEM_H_
#define KINDRED_TESTS_TESTLIB_FAULT_FILE_SYSTEM_H_

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
};

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_FAULT_FILE_SYSTEM_H_
