// kindred: reading an index file (`.kin`).
//
// An index file holds the settings that decided its signatures, then
// append-only, checksummed segments of documents: ids, keep-policy facts,
// MinHash signatures, sorted band-key tables and shingle sets for exact
// verification. The byte layout is documented in src/index/FORMAT.md.
//
// IndexReader maps the file read-only and verifies the header and every
// segment's tables on open (a torn tail, the remains of an interrupted
// write, is reported and ignored). It never rebuilds a hash table of the
// stored band keys: a query binary-searches each segment's sorted table.
// Any number of readers may open a file while one writer appends to it;
// a reader sees the segments committed when it opened.
//
// Thread-safety: after Open() (and UseBanding(), if called), all const
// methods may be called concurrently.
#ifndef KINDRED_INDEX_H_
#define KINDRED_INDEX_H_

#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/file_io.h"
#include "kindred/groups.h"
#include "kindred/settings.h"

namespace kindred {

// Containment keys (format version 3; src/index/FORMAT.md, "Containment
// keys"): when min_size > 0, each segment's band-key table also holds every
// document's band keys under the containment plan (containment_lsh.h) for
// `threshold`, `min_size` and `partitions` size partitions, so that a
// containment query with that threshold and least contained size looks
// them up instead of computing them. All 0: none (versions 1 and 2).
struct ContainmentKeys {
  double threshold = 0;
  uint32_t min_size = 0;
  uint32_t partitions = 0;
  bool stored() const { return min_size > 0; }
  friend bool operator==(const ContainmentKeys&, const ContainmentKeys&) = default;
};

// Sizes up to this many shingles (about a million words) get a size
// partition of their own in an index's containment plan; larger documents
// share the last one (found with less certainty: LSH Ensemble plans a
// partition for its upper bound). A judgement of this project.
inline constexpr uint32_t kContainmentKeysLargestSize = uint32_t{1} << 20;

// The containment keys for a threshold and least contained size: as many
// partitions as cover kContainmentKeysLargestSize. Requires threshold in
// (0, 1], min_size >= 1.
ContainmentKeys ContainmentKeysFor(double threshold, uint32_t min_size);

// What the file header holds.
struct IndexSettings {
  // Decide every stored shingle set and signature.
  SignatureSettings signature;
  // The Unicode/ICU versions that normalized and segmented the text, e.g.
  // "unicode 15.0 icu 72.1" (at most 256 bytes).
  std::string unicode_version;
  // The banding of the stored band-key tables; bands * rows <= perms, both >= 1.
  uint32_t bands = 1;
  uint32_t rows = 1;
  // Default query threshold and measure.
  double threshold = 0.8;
  Measure measure = Measure::kJaccard;
  // Stored containment keys (none by default).
  ContainmentKeys containment;

  friend bool operator==(const IndexSettings&, const IndexSettings&) = default;
};

// One committed segment, as `info` lists it.
struct SegmentInfo {
  uint32_t number = 0;
  uint64_t offset = 0;     // byte offset in the file
  uint64_t bytes = 0;      // header, body and commit record
  uint32_t first_doc = 0;  // global number of its first document
  uint32_t documents = 0;
  uint64_t retired = 0;  // earlier documents it replaces
  uint64_t band_keys = 0;
  uint64_t shingle_bytes = 0;  // encoded shingle sets
};

struct IndexOpenOptions {
  FileSystem* file_system = DefaultFileSystem();  // borrowed
  // Many queries will follow (a service): segments after the first 8 are
  // looked up through in-memory tables built at open (16 bytes per band
  // key; for a million documents in many segments, seconds of opening and
  // about 240 MB), so a file of many mid-sized segments answers about as
  // fast as its compacted copy. Otherwise only the small segments at the
  // end are (those group commits write).
  bool many_queries = false;
};

namespace index {
class TailTables;
class ContainmentLookupCache;
}  // namespace index

class IndexReader {
 public:
  // Maps and verifies `path`. Errors: NotFound/PermissionDenied (cannot
  // open), DataLoss (not an index, truncated header, a checksum or structure
  // error: the message names the segment and byte offset), FailedPrecondition
  // (a newer format version).
  static absl::StatusOr<std::unique_ptr<IndexReader>> Open(const std::string& path,
                                                           const IndexOpenOptions& options = {});
  ~IndexReader();

  // Catches up with segments appended to the file since it was opened (or
  // last caught up): maps the file again when its size changed (a writer
  // that reserves space overwrites zeros inside the mapping: the mapping is
  // shared, so it shows them), then verifies and adds only the segments
  // after committed_size(); those already read stay as they are (an earlier
  // mapping is kept, so views of them stay valid), and a
  // query-time banding (UseBanding) is rebuilt. Costs the new segments, not
  // the whole index. Errors as Open(); on error the reader is unchanged.
  absl::Status ReadAppended(const IndexOpenOptions& options = {});

  const std::string& path() const { return path_; }
  // 2 for files that record their commits, 3 for those that also store
  // containment keys (settings().containment); 1 for older files (readable,
  // not writable: `compact` rewrites them as version 2).
  uint32_t format_version() const { return format_version_; }
  // The commit generation the file records (0 for version 1), and how many
  // of its two commit slots fail their checksum (an interrupted commit
  // leaves one; not damage while the other verifies).
  uint64_t commit_generation() const { return commit_generation_; }
  uint32_t damaged_commit_slots() const { return damaged_commit_slots_; }
  const IndexSettings& settings() const { return settings_; }
  absl::Span<const SegmentInfo> segments() const { return segments_; }
  uint64_t file_size() const { return file_.size(); }
  // End of the last committed segment; bytes after it are a torn tail. In
  // version 2 this is the committed length the file records: a file shorter
  // than that, or a committed segment that does not verify, is DataLoss.
  uint64_t committed_size() const { return committed_size_; }
  // The bytes after committed_size(): a run of zero bytes at the very end of
  // a version-2 file is space a writer reserved (FORMAT.md, "Reserved
  // space"), the rest a torn tail. Both are ignored by readers and cut off
  // by the next writer. Counted when the file is mapped.
  uint64_t torn_tail_bytes() const { return file_.size() - committed_size_ - reserved_bytes_; }
  uint64_t reserved_bytes() const { return reserved_bytes_; }

  // Documents are numbered 0..document_count()-1 in the order they were
  // added ("first seen"), across segments. Retired documents (replaced by a
  // later one with the same id) keep their number but are not live.
  uint32_t document_count() const { return document_count_; }
  uint32_t live_count() const { return live_count_; }
  bool is_live(uint32_t doc) const { return !retired_[doc]; }

  // Accessors; `doc` < document_count(). Returned views borrow the mapping
  // and live as long as the reader.
  std::string_view id(uint32_t doc) const;
  KeepFacts facts(uint32_t doc) const;
  absl::Span<const uint32_t> signature(uint32_t doc) const;
  uint32_t shingle_count(uint32_t doc) const;
  // Decodes the document's shingle set into *out (replacing its contents),
  // after verifying its checksum: DataLoss names the document's id and the
  // damaged byte range on mismatch.
  absl::Status ReadShingles(uint32_t doc, std::vector<uint64_t>* out) const;
  // The document's encoded shingle set as stored (FORMAT.md, "shingle_bytes")
  // and, in *checksum, the checksum its record holds; unverified. For
  // copying a set without decoding it.
  std::string_view StoredShingles(uint32_t doc, uint64_t* checksum) const;
  // Verifies the checksum of every document's shingle set (opening checks
  // the tables only); DataLoss as ReadShingles for the first mismatch.
  absl::Status VerifyShingleChecksums() const;

  // The live document with this id, if any (binary search per segment).
  std::optional<uint32_t> FindLive(std::string_view id) const;

  // Sets the banding that Candidates() uses. With the stored banding (the
  // default) nothing is built; any other bands x rows <= perms builds an
  // in-memory sorted key table from the stored signatures. Not thread-safe;
  // call before concurrent queries.
  absl::Status UseBanding(uint32_t bands, uint32_t rows);
  uint32_t bands() const { return bands_; }
  uint32_t rows() const { return rows_; }

  // Appends to *out the live documents that share at least one band key
  // with `keys` (the band keys of a query signature under the current
  // banding, one per band), ascending and without repeats. A crowded key,
  // one that more than `max_bucket` indexed documents (live or retired)
  // share, proposes only the first live one of them, as sweep pairs the
  // members of a crowded bucket with its first document only (see
  // candidates.h), and is counted in *crowded when that is not null.
  // max_bucket 0: no cap. The cost per key is then logarithmic in the
  // index, not linear in the bucket.
  void Candidates(absl::Span<const uint64_t> keys, std::vector<uint32_t>* out,
                  uint64_t max_bucket = 0, uint64_t* crowded = nullptr) const;

  // The containment search tables built for this reader's queries, kept
  // between them (index/containment_lookup.h; used by MatchAgainstIndex).
  // Thread-safe.
  index::ContainmentLookupCache& containment_lookups() const { return *containment_lookups_; }

  // Calls visit(key, doc) for every band key of every live document under
  // the current banding, segment by segment (keys ascending within each).
  void ForEachBandKey(const std::function<void(uint64_t key, uint32_t doc)>& visit) const;

 private:
  struct Segment;
  IndexReader() = default;
  absl::Status Load();
  // Verifies and adds the segments of file_ from committed_size_ to `end`.
  // `recorded`: `end` is a recorded committed length, so every byte up to
  // it must be whole segments (version 2); otherwise a segment that cannot
  // be read whole may end the committed part as a torn tail (version 1).
  absl::Status LoadSegments(uint64_t end, bool recorded);
  // Version 2: reads the commit area, then the segments up to what it records.
  absl::Status LoadCommitted();
  // The run of zero bytes at the end of the mapped file, after the commit.
  uint64_t CountReservedBytes() const;
  // The DataLoss status for a damaged shingle set of `doc`.
  absl::Status ShingleError(uint32_t doc) const;
  const Segment& SegmentOf(uint32_t doc, uint32_t* local) const;
  // The entries of one band key in one table (src/index/index_lookup.cc).
  struct KeyRange;
  // Appends to *ranges the entries of `key` under the current banding,
  // document numbers ascending across them; returns their count.
  uint64_t FindKeyRanges(uint64_t key, std::vector<KeyRange>* ranges) const;

  std::string path_;
  std::unique_ptr<MappedFile> mapping_;
  // Mappings replaced by ReadAppended(), kept for the views into them.
  std::vector<std::unique_ptr<MappedFile>> earlier_mappings_;
  std::string_view file_;
  IndexSettings settings_;
  std::vector<SegmentInfo> segments_;
  std::vector<Segment> segment_views_;
  std::vector<uint32_t> segment_first_doc_;
  std::vector<bool> retired_;
  uint64_t committed_size_ = 0;
  uint64_t reserved_bytes_ = 0;
  uint32_t format_version_ = 0;
  uint64_t commit_generation_ = 0;
  uint32_t damaged_commit_slots_ = 0;
  uint32_t document_count_ = 0;
  uint32_t live_count_ = 0;
  uint32_t bands_ = 0;
  uint32_t rows_ = 0;
  // With a banding other than the stored one: all (key, doc), sorted.
  std::vector<std::pair<uint64_t, uint32_t>> memory_keys_;
  // Segments tail_from_.. (when opened: the small ones at the end, and with
  // many_queries all after the first 8; and all read by ReadAppended) are
  // looked up through tail_, not one by one.
  size_t tail_from_ = 0;
  std::unique_ptr<index::TailTables> tail_;
  std::unique_ptr<index::ContainmentLookupCache> containment_lookups_;
  // Adds the segments from `from` (at least tail_from_) on to tail_.
  void ExtendTail(size_t from);
};

// Compares the settings a command asks for with the stored ones. Returns
// FailedPrecondition naming every differing field when the signature
// settings differ; appends a warning to *warnings when only the Unicode/ICU
// version differs (saying what may differ).
absl::Status CheckIndexSettings(const IndexSettings& stored, const SignatureSettings& wanted,
                                std::string_view current_unicode_version,
                                std::vector<std::string>* warnings);

}  // namespace kindred

#endif  // KINDRED_INDEX_H_
