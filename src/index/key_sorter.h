// Sorting the (band key, document) entries of a segment's band-key table
// (FORMAT.md, "band_keys" and "band_docs") under a memory budget.
//
// Entries are collected in memory; with a budget, each time the collected
// entries reach it they are sorted and written as one run to a ScratchFile
// of a FileSystem (kindred/file_io.h: made in the scratch directory without
// a name, so nothing is left behind, even after a crash). Reading merges the
// runs, in exactly the (key, document) order one in-memory sort gives, so a
// table written from it is the same bytes with and without a budget.
//
// Thread-compatible: one thread uses a KeySorter.
#ifndef KINDRED_INDEX_KEY_SORTER_H_
#define KINDRED_INDEX_KEY_SORTER_H_

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "core/band_spill.h"
#include "kindred/file_io.h"

namespace kindred::index {

class KeySorter {
 public:
  // budget_bytes 0: every entry stays in memory (16 bytes each, plus as
  // much again while sorting). Otherwise memory stays near the budget (runs
  // of budget / 64 entries) and runs go to a scratch file of `fs`
  // (borrowed; must outlive the sorter) in `scratch_dir`.
  KeySorter(uint64_t budget_bytes, std::string scratch_dir, FileSystem* fs);
  ~KeySorter();
  KeySorter(const KeySorter&) = delete;
  KeySorter& operator=(const KeySorter&) = delete;

  // Errors: DiskFull when the scratch file's disk is full, else
  // WriteFailed, naming the scratch directory.
  absl::Status Add(uint64_t key, uint32_t doc);
  // Sorts what is left in memory; call once, after the last Add.
  absl::Status Finish();

  uint64_t size() const { return count_; }
  // Runs written to the scratch file (0 when everything fit in memory).
  size_t runs() const { return runs_.size(); }

  // After Finish(): calls visit(entry) for every entry in (key, doc) order.
  // May be called more than once. Errors: WriteFailed (a scratch read
  // failed).
  absl::Status ForEach(const std::function<void(const BucketEntry&)>& visit) const;

 private:
  struct Run {
    uint64_t offset;  // byte offset in the scratch file
    uint64_t count;   // entries
  };
  absl::Status Spill();

  uint64_t budget_;
  std::string dir_;
  size_t run_capacity_;  // entries per run (budget 0: unlimited)
  EntryVector entries_;
  FileSystem* fs_;
  std::unique_ptr<ScratchFile> file_;  // made by the first run
  std::vector<Run> runs_;
  uint64_t count_ = 0;
};

}  // namespace kindred::index

#endif  // KINDRED_INDEX_KEY_SORTER_H_
