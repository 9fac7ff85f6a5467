// kindred: band keys spilled to disk under a memory budget.
//
// A lean corpus keeps 8 bytes per band per document of band keys: about
// 120 bytes a document by default, over a gigabyte for ten million. Under a
// memory budget, SignedCorpus moves the keys of each batch of documents to a
// BandSpill once they outgrow their share: for every band, the batch's
// (key, document) entries are sorted and written as one run. Candidate
// search then reads each band as a k-way merge of its runs (BandMerger), in
// exactly the (key, document) order an in-memory sort gives, so the candidate
// pairs are identical with and without spilling.
//
// The runs go to one ScratchFile (kindred/file_io.h) of a FileSystem, made
// in the scratch directory without a name: nothing is left behind, even
// after a crash. Entries are 12 bytes: key (u64) and document (u32),
// little-endian.
//
// Thread-safety: AddRun is not thread-safe; once all runs are added, any
// number of BandMergers (one per thread) may read concurrently.
#ifndef KINDRED_CORE_BAND_SPILL_H_
#define KINDRED_CORE_BAND_SPILL_H_

#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "core/block_arena.h"
#include "kindred/file_io.h"

namespace kindred {

// One (band key, document) entry; ordered by key, then document.
struct BucketEntry {
  uint64_t key;
  uint32_t doc;
  bool operator<(const BucketEntry& other) const {
    return key != other.key ? key < other.key : doc < other.doc;
  }
};

// A band's entries: large, filled and sorted once per band, so kept in
// huge pages.
using EntryVector = HugePageVector<BucketEntry>;

// Sorts entries by (key, doc), using `scratch` and `offsets` as working
// space. Expected linear time for keys that are hashes.
void SortEntries(EntryVector& entries, EntryVector& scratch, HugePageVector<uint32_t>& offsets);

class BandSpill {
 public:
  // A spill to a scratch file of `fs` (borrowed; must outlive the spill) in
  // directory `dir`. Errors: those of FileSystem::CreateScratch (DiskFull,
  // WriteFailed), naming the directory.
  static absl::StatusOr<std::unique_ptr<BandSpill>> Create(FileSystem* fs, const std::string& dir,
                                                           uint32_t bands);
  ~BandSpill();
  BandSpill(const BandSpill&) = delete;
  BandSpill& operator=(const BandSpill&) = delete;

  // Writes one run of documents first_doc, ..., first_doc + docs - 1:
  // columns[band][i] is the key of document first_doc + i in `band`
  // (entries equal to kNoBandKey are left out). Errors: DiskFull when the
  // scratch file's disk is full, else WriteFailed; the runs added before
  // stay readable.
  absl::Status AddRun(uint32_t first_doc, size_t docs, absl::Span<const uint64_t* const> columns);

  uint32_t bands() const { return bands_; }
  size_t runs() const { return runs_.size(); }
  uint64_t bytes_written() const { return file_->size(); }
  const std::string& dir() const { return dir_; }

 private:
  friend class BandMerger;
  struct Section {
    uint64_t offset;  // byte offset in the file
    uint64_t count;   // entries
  };
  BandSpill(std::unique_ptr<ScratchFile> file, std::string dir, uint32_t bands)
      : file_(std::move(file)), dir_(std::move(dir)), bands_(bands) {}

  std::unique_ptr<ScratchFile> file_;
  std::string dir_;
  uint32_t bands_;
  std::vector<std::vector<Section>> runs_;  // runs_[run][band]
};

// The entries of one band of every run of a BandSpill, plus `resident`
// (sorted, in memory; borrowed), in (key, doc) order.
class BandMerger {
 public:
  BandMerger(const BandSpill& spill, uint32_t band, absl::Span<const BucketEntry> resident);
  ~BandMerger();
  // The next entry into *entry; false at the end. Errors: those of
  // ScratchFile::ReadAt (WriteFailed: a read failed).
  absl::StatusOr<bool> Next(BucketEntry* entry);

 private:
  struct Cursor;
  std::vector<std::unique_ptr<Cursor>> cursors_;
  std::vector<uint32_t> heap_;  // cursor indices, a min-heap on their head
  bool started_ = false;
};

}  // namespace kindred

#endif  // KINDRED_CORE_BAND_SPILL_H_
