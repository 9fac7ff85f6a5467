// The band-key table of an index: sorted (key, document) rows, as each
// segment stores it (FORMAT.md, "band_keys"), as a reader builds it in
// memory for a banding other than the stored one or for containment keys
// not stored, and as audit recomputes it. Built here, one way, for all of
// them; compact, whose table may exceed memory, feeds DocumentKeys into its
// external sort (key_sorter.h) instead.
//
// A document's keys are those of one banding (kNoBandKey left out) and,
// with a containment plan, its containment keys (containment_keys.h). A
// document with no shingles has none (its slots are all kEmptySlot).
//
// Pure functions over borrowed data; plans are immutable and may be shared
// between threads.
#ifndef KINDRED_INDEX_KEY_TABLE_H_
#define KINDRED_INDEX_KEY_TABLE_H_

#include <cstdint>
#include <memory>
#include <utility>
#include <vector>

#include "absl/functional/function_ref.h"
#include "absl/types/span.h"
#include "kindred/banding.h"
#include "kindred/containment_lsh.h"
#include "kindred/index.h"

namespace kindred::index {

// Which keys a document has.
struct KeyPlan {
  Banding banding;                                     // bands and rows >= 1
  std::shared_ptr<const ContainmentPlan> containment;  // null: no containment keys
};

// The plan of an index's stored table: settings.bands x settings.rows, and
// the containment keys when settings.containment.stored().
KeyPlan StoredKeyPlan(const IndexSettings& settings);

// The keys of one document: with containment keys, ascending and without
// repeats; without, in band order. Requires a signature of at least
// plan.banding.slots() slots (of the plan's perms with containment keys).
// Replaces *keys.
void DocumentKeys(const KeyPlan& plan, absl::Span<const uint32_t> signature, uint32_t shingle_count,
                  std::vector<uint64_t>* keys);

// One document as the table builder reads it.
struct KeyedDocument {
  absl::Span<const uint32_t> signature;  // borrowed until the builder returns
  uint32_t shingle_count = 0;
  bool skip = false;  // not in the table (a retired document)
};

using KeyRow = std::pair<uint64_t, uint32_t>;  // (key, document)
using KeyTable = std::vector<KeyRow>;

// The rows (key, doc) of the documents numbered [from, to) that are not
// skipped, each with its DocumentKeys, sorted by key, then document.
// `document(doc)` is called once per number, in ascending order. The
// result depends on the documents and the plan only.
KeyTable BuildKeyTable(const KeyPlan& plan, uint32_t from, uint32_t to,
                       absl::FunctionRef<KeyedDocument(uint32_t doc)> document);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_KEY_TABLE_H_
