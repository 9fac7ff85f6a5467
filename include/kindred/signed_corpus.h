// kindred: the signed form of a corpus.
//
// SignedCorpus holds, for every document in first-seen order, what the later
// stages need: its id, its keep-policy facts, where it was read, and either
//   - everything (the default): its MinHash signature and its shingle set,
//     for candidate search, exact verification and index files; or
//   - the lean form (Lean()): only the band keys of one banding and the size
//     of the shingle set. A sweep needs sets and signatures only for the few
//     documents that land in candidate pairs; those are attached later
//     (AttachRoom, after reading the documents again: see reload.h).
//     A million documents then cost about 200 bytes each instead of ~2 KB,
//     and most of a sweep's time on fresh memory is saved.
// Storage is flat (large blocks that never move, arrays advised as huge
// pages; lean band keys one column per band), so a million documents cost a
// few allocations, not millions. How it is stored is private to
// src/core/signed_corpus.cc; spilled band keys are src/core/band_spill.h.
//
// SignCorpus() fills one from a CorpusReader on a fixed pool of `threads`
// threads (the calling thread is one of them): each reads a small batch in
// turn, parses, shingles and signs it, and the calling thread appends the
// signed batches in read order (see src/core/sign_corpus.cc). The result,
// and the first error reported, do not depend on the thread count.
//
// Thread-safety: const methods may be called concurrently; Add() and
// AttachRoom() may not (filling the rooms it returns may).
#ifndef KINDRED_SIGNED_CORPUS_H_
#define KINDRED_SIGNED_CORPUS_H_

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/types/span.h"
#include "kindred/banding.h"
#include "kindred/corpus.h"
#include "kindred/document_table.h"  // DocumentOrigin
#include "kindred/groups.h"
#include "kindred/settings.h"

namespace kindred {

class BandSpill;   // band keys spilled to sorted runs (internal)
class FileSystem;  // kindred/file_io.h

class SignedCorpus {
 public:
  // Keeps signatures and shingle sets of every document.
  explicit SignedCorpus(uint32_t perms);
  ~SignedCorpus();
  SignedCorpus(SignedCorpus&& other) noexcept;
  SignedCorpus& operator=(SignedCorpus&& other) noexcept;
  // Keeps the band keys of `banding` and set sizes only. Requires
  // banding.slots() <= perms.
  static SignedCorpus Lean(uint32_t perms, Banding banding);

  uint32_t perms() const { return perms_; }
  size_t size() const { return view_.size; }
  // Makes room for `documents` in all, so that the per-document arrays do
  // not grow by doubling (copies, fresh pages, and up to twice the memory).
  void Reserve(size_t documents);
  // Removes every document, keeping the memory for the next ones (and the
  // lean banding). Requires no spill.
  void Clear();
  // About how many bytes the documents take: sets, signatures, band keys
  // and the fixed per-document data (not the ids' own heap memory).
  size_t memory_bytes() const;
  bool lean() const { return banding_.bands != 0; }
  // The banding whose keys a lean corpus keeps ({0, 0} when not lean).
  Banding lean_banding() const { return banding_; }

  // Appends one document: `shingles` is its sorted set, `signature` its
  // signature (size perms()). Copies what the corpus keeps (borrows nothing).
  void Add(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
           absl::Span<const uint64_t> shingles, absl::Span<const uint32_t> signature);

  // Lean only: appends a document whose band keys (lean_banding().bands of
  // them; see LeanBandKeys) the caller computed, and the size of its set or
  // bag (zero when it has no shingles). Copies the keys.
  void AddWithBandKeys(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                       uint32_t shingle_count, absl::Span<const uint64_t> band_keys);
  // The band keys a lean corpus keeps for a document: those of `signature`,
  // or all kNoBandKey when the document has no shingles.
  static void LeanBandKeys(Banding banding, bool empty, absl::Span<const uint32_t> signature,
                           absl::Span<uint64_t> out);

  // Lean only: attaches room for a sorted set of `shingles` values and a
  // signature to document `doc`, which must not have them yet, and returns
  // where they go. The caller fills both (from any thread, concurrently for
  // different documents) before the corpus is read again; filling in the
  // workers spreads the cost of touching fresh memory over them.
  struct AttachedRoom {
    uint64_t* shingles;
    uint32_t* signature;
  };
  AttachedRoom AttachRoom(uint32_t doc, size_t shingles);

  const std::string& id(size_t doc) const { return view_.ids[doc]; }
  absl::Span<const std::string> ids() const { return {view_.ids, view_.size}; }
  const KeepFacts& facts(size_t doc) const { return view_.facts[doc]; }
  absl::Span<const KeepFacts> all_facts() const { return {view_.facts, view_.size}; }
  const DocumentOrigin& origin(size_t doc) const { return view_.origins[doc]; }
  // Size of the document's shingle set. In a lean corpus before
  // AttachRoom, only whether it is zero is known (signing skips the
  // sort that would count duplicates).
  uint32_t shingle_count(size_t doc) const { return view_.shingle_count[doc]; }
  // Whether shingles() and signature() may be called: always when not lean,
  // after AttachRoom (and filling) when lean.
  bool has_shingles(size_t doc) const { return view_.signature_data[doc] != nullptr; }
  // Requires has_shingles(doc).
  absl::Span<const uint64_t> shingles(size_t doc) const {
    return absl::MakeConstSpan(view_.shingle_data[doc], view_.shingle_count[doc]);
  }
  // Requires has_shingles(doc).
  absl::Span<const uint32_t> signature(size_t doc) const {
    return absl::MakeConstSpan(view_.signature_data[doc], perms_);
  }
  // Lean only: the key of document `doc` in `band`. Requires
  // doc >= first_resident() and band < lean_banding().bands.
  uint64_t band_key(size_t doc, uint32_t band) const {
    return view_.key_table[band * key_stride_ + (doc - first_resident_)];
  }
  // Lean only: the keys in `band` of the documents held in memory, from
  // first_resident() on. Keys are stored band by band, so that candidate
  // search reads each band's keys in one sequential sweep.
  absl::Span<const uint64_t> band_column(uint32_t band) const {
    return absl::MakeConstSpan(view_.key_table + band * key_stride_, size() - first_resident_);
  }
  // Lean only: a 32-bit digest of the document's band keys (kept for every
  // document, spilled or not), to check a document read again.
  uint32_t band_key_digest(size_t doc) const { return view_.band_key_digests[doc]; }
  static uint32_t BandKeyDigest(absl::Span<const uint64_t> keys);

  // Lean only: groups documents whose shingle sets are identical. Each
  // group is represented by its first document (its representative): only
  // representatives have band keys (the others all kNoBandKey), so a group
  // takes part in candidate search once; identical sets are pairs of
  // Jaccard exactly 1 and need no intersection (see sweep.cc). Sets are told
  // apart by a 128-bit XXH3 digest of the sorted set. The sets and
  // signatures of representatives are kept (attached, as by AttachRoom)
  // while they take at most `set_budget_bytes` in all; the others are read
  // again when needed (reload.h). Call before the first document.
  void GroupIdenticalSets(uint64_t set_budget_bytes);
  bool groups_identical() const { return identical_; }
  // A 128-bit digest (XXH3) of a sorted set, or of a text.
  struct Digest {
    uint64_t low = 0, high = 0;
    friend bool operator==(const Digest&, const Digest&) = default;
    template <typename H>
    friend H AbslHashValue(H h, const Digest& d) {
      return H::combine(std::move(h), d.low, d.high);
    }
  };
  static Digest SetDigest(absl::Span<const uint64_t> set);
  // One signed document for a corpus that groups identical sets:
  //  - a new text with its sorted set (`sorted`), the set's digest, its
  //    signature and band keys (of lean_banding()); its set is grouped by
  //    digest and kept when there is room;
  //  - a new text signed as a bag (not `sorted`): bag_size, signature and
  //    band keys; it represents itself;
  //  - a text already seen: same_text_as, the earlier document with it; when
  //    `sorted`, set and signature are that text's, kept for its
  //    representative if that has none yet.
  struct SignedDocument {
    bool sorted = false;
    absl::Span<const uint64_t> set;
    uint32_t bag_size = 0;
    Digest digest;
    absl::Span<const uint32_t> signature;
    absl::Span<const uint64_t> band_keys;
    int64_t same_text_as = -1;
  };
  // Whether sets are still being kept (the budget is not used up).
  bool set_room() const { return kept_set_bytes_ < set_budget_; }
  // Requires groups_identical(). Copies what it keeps.
  void AddGrouped(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                  const SignedDocument& signed_doc);
  // The representative of doc's group (doc itself when it is one, when the
  // corpus does not group identical sets, and for empty documents).
  uint32_t representative(size_t doc) const {
    return identical_ ? view_.rep_of[doc] : static_cast<uint32_t>(doc);
  }
  // Members of the group doc represents (0 for a document that is not a
  // representative; 1 when not grouping).
  uint32_t group_size(size_t doc) const { return identical_ ? view_.group_size[doc] : 1; }

  // Lean only, spilling: once the band keys held in memory take more than
  // `budget_bytes`, spill_due() says so and SpillBandKeys() moves them to
  // sorted runs in a scratch file of `fs` (borrowed; must outlive the
  // corpus) in directory `dir` (see sweep.h), keeping the memory for the
  // next documents.
  void SetSpill(uint64_t budget_bytes, std::string dir, FileSystem* fs);
  bool spill_due() const { return spill_budget_ > 0 && resident_key_bytes() > spill_budget_; }
  // Errors: DiskFull when the scratch file's disk is full, else
  // WriteFailed when it cannot be created or written (naming the scratch
  // directory). The documents of a failed spill stay in memory.
  absl::Status SpillBandKeys();
  // The first document whose band keys are in memory (0 when none were
  // spilled), and the spilled ones (null when none).
  size_t first_resident() const { return first_resident_; }
  const BandSpill* spill() const { return view_.spill; }

 private:
  struct Store;  // the arrays, arenas and tables (signed_corpus.cc)
  // Where the inline accessors read: the arrays of store_, refreshed by
  // Sync() after every change that may move them.
  struct View {
    size_t size = 0;
    const std::string* ids = nullptr;
    const KeepFacts* facts = nullptr;
    const DocumentOrigin* origins = nullptr;
    const uint64_t* const* shingle_data = nullptr;
    const uint32_t* shingle_count = nullptr;
    const uint32_t* const* signature_data = nullptr;
    const uint64_t* key_table = nullptr;
    const uint32_t* band_key_digests = nullptr;
    const uint32_t* rep_of = nullptr;
    const uint32_t* group_size = nullptr;
    const BandSpill* spill = nullptr;
  };
  void Sync();
  void AddKeys(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
               uint32_t shingle_count, absl::Span<const uint64_t> keys);
  // Keeps a representative's set and signature when the budget allows.
  void KeepSet(uint32_t doc, absl::Span<const uint64_t> set, absl::Span<const uint32_t> signature);
  // Makes room for `docs` resident documents in every band's column.
  void GrowKeyTable(size_t docs);
  size_t resident_key_bytes() const {
    return (size() - first_resident_) * banding_.bands * sizeof(uint64_t);
  }

  uint32_t perms_;
  Banding banding_{0, 0};
  std::unique_ptr<Store> store_;
  View view_;
  // Lean only: the key table holds a column of key_stride_ keys per band:
  // the key of document first_resident_ + i in band b is at
  // b * key_stride_ + i.
  size_t key_stride_ = 0;
  uint64_t spill_budget_ = 0;
  std::string spill_dir_;
  FileSystem* spill_fs_ = nullptr;
  size_t first_resident_ = 0;
  // Grouping identical sets (GroupIdenticalSets).
  bool identical_ = false;
  uint64_t set_budget_ = 0;
  uint64_t kept_set_bytes_ = 0;
};

// What signing saw, beyond the documents themselves.
struct SignStats {
  uint64_t documents = 0;
  uint64_t empty_documents = 0;  // no shingles: never anyone's duplicate
  uint64_t bytes = 0;            // text bytes read
  uint64_t invalid_utf8_documents = 0;
  uint64_t invalid_utf8_sequences = 0;
  // HTML pages of crawl archives, and those of them the reference HTML
  // parser read because the fast path declined them.
  uint64_t html_pages = 0;
  uint64_t html_reference_pages = 0;
  // How far reading has come: raw bytes read from the input files, and
  // their total size when known (else 0). See CorpusReader.
  uint64_t raw_bytes = 0;
  uint64_t raw_bytes_total = 0;
};

struct SignOptions {
  int threads = 1;
  // When set, SignCorpus hands the corpus to `flush` after any batch that
  // takes it over flush_bytes (SignedCorpus::memory_bytes()) and, once
  // flush returned OK, empties it (document numbers start again at 0) and
  // goes on: for writing a corpus too large for memory part by part. Ids
  // are then checked for repeats within each part only. An error of flush
  // ends signing with that error.
  std::function<absl::Status(const SignedCorpus&)> flush;
  size_t flush_bytes = 0;
  // Documents are read and signed in batches of at most batch_documents
  // documents, ending early once their texts reach batch_bytes. Small
  // batches touch little fresh memory and keep the threads evenly loaded.
  size_t batch_documents = 256;
  size_t batch_bytes = 1 << 20;
  // Called after each batch with the running totals (on the calling thread).
  std::function<void(const SignStats&)> progress;
  // Called for each document whose text held invalid UTF-8 (on the calling
  // thread, in document order): the document's id and the count.
  std::function<void(const std::string& id, uint32_t invalid)> on_invalid_utf8;
};

// Reads every document of `reader`, shingles and signs it per `settings`, and
// appends it to *out (whose perms() must equal settings.perms). Rejects a
// repeated id with InvalidArgument naming both places. On error *out holds a
// prefix of the corpus and must not be used as complete.
absl::Status SignCorpus(CorpusReader& reader, const SignatureSettings& settings,
                        const SignOptions& options, SignedCorpus* out, SignStats* stats);

}  // namespace kindred

#endif  // KINDRED_SIGNED_CORPUS_H_
