// kindred: one batch of documents being signed, and the signing of it on a
// worker thread (the middle step of SignCorpus, sign_corpus.cc).
//
// Thread-safety: a SigningBatch belongs to one thread at a time. SeenTexts
// may be read by any number of signing threads while one thread (the one
// that commits batches) adds to it.
#ifndef KINDRED_CORE_SIGN_BATCH_H_
#define KINDRED_CORE_SIGN_BATCH_H_

#include <cstdint>
#include <shared_mutex>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/status/status.h"
#include "core/document_signer.h"
#include "kindred/corpus.h"
#include "kindred/shingles.h"
#include "kindred/signed_corpus.h"

namespace kindred {

// One batch of documents and what signing found for each; reused.
struct SigningBatch {
  uint64_t sequence = 0;  // position in read order
  std::vector<Document> docs;
  // The read that made this batch failed after these documents: the batch is
  // committed, then this error ends signing.
  absl::Status read_error;
  std::vector<ShingleSet> sets;     // kept sets (not for lean corpora)
  std::vector<uint32_t> set_sizes;  // size of each set or bag
  std::vector<uint32_t> signatures;
  std::vector<uint64_t> band_keys;  // lean corpora only
  std::vector<TextStats> text_stats;
  std::vector<absl::Status> errors;
  std::vector<uint8_t> unparsable;  // errors[i] is the line's own parse error
  // Grouping identical sets (SignedCorpus::groups_identical()): digests of
  // the texts and the sets, and for a text seen before the document that
  // had it (else -1).
  std::vector<SignedCorpus::Digest> text_digests;
  std::vector<SignedCorpus::Digest> set_digests;
  std::vector<int64_t> same_text;
  std::vector<uint8_t> sorted;  // sets[i] is a sorted set (else a bag, or nothing)

  // Clears the per-document results for docs.size() documents.
  void ResetResults(uint32_t perms, uint32_t bands);
};

// The texts of the documents committed so far, for a corpus that groups
// identical sets: digest -> the first document with it, the invalid UTF-8
// its shingling counted, and whether its representative's set is kept.
class SeenTexts {
 public:
  // For each parsed document of `batch` (text digests filled): same_text,
  // its invalid UTF-8 count when seen, and whether it is to be shingled
  // into a sorted set (`keeping` sets, and a text not seen, or seen while
  // its representative has no set).
  void Find(SigningBatch* batch, bool keeping) const;
  // After the commit of `batch`, whose first document is `first_doc` of
  // `corpus`: its new texts, and texts whose representatives now have sets.
  void Remember(const SigningBatch& batch, size_t first_doc, const SignedCorpus& corpus);

 private:
  struct Seen {
    uint32_t doc;
    uint32_t invalid_utf8;
    bool has_set;  // its representative's set is kept (or empty)
  };
  mutable std::shared_mutex mu_;
  absl::flat_hash_map<SignedCorpus::Digest, Seen> texts_;
};

// Parses, shingles and signs every document of `batch` (results from
// ResetResults on). A lean corpus gets bags and band keys, a full one
// sorted sets.
void SignPlainBatch(SigningBatch* batch, bool lean, DocumentSigner& signer);

// SignPlainBatch for a corpus that groups identical sets. A text seen
// before (by its 128-bit digest, among the documents committed so far) is
// not shingled again, unless the document that had it kept no set while
// sets are being kept: then this copy provides it. While sets are kept
// (`keeping`), the others get sorted sets and set digests; otherwise bags,
// as a lean corpus signs them. Whatever is caught or kept here, the commit
// gives the same documents and pairs: this only saves work.
void SignGroupedBatch(SigningBatch* batch, const SeenTexts& seen, bool keeping,
                      DocumentSigner& signer);

}  // namespace kindred

#endif  // KINDRED_CORE_SIGN_BATCH_H_
