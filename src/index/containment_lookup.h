// The containment search of a query document against an index: the live
// indexed documents that LSH Ensemble proposes (containment_keys.h), from
// the index's stored containment keys when they were stored for the query's
// threshold and least contained size, else from a table of every indexed
// document's containment keys built in memory from the stored signatures.
// Such tables cost the whole index, so each reader keeps them
// (ContainmentLookupCache, owned by the IndexReader): built on the first
// query of a threshold and least contained size, extended with the new
// documents only after the reader catches up with appended segments.
//
// Immutable after Create(); Candidates() may be called concurrently. The
// cache is thread-safe.
#ifndef KINDRED_INDEX_CONTAINMENT_LOOKUP_H_
#define KINDRED_INDEX_CONTAINMENT_LOOKUP_H_

#include <cstdint>
#include <map>
#include <memory>
#include <mutex>
#include <utility>
#include <vector>

#include "absl/types/span.h"
#include "index/key_table.h"
#include "kindred/containment_lsh.h"
#include "kindred/index.h"
#include "kindred/settings.h"

namespace kindred::index {

class ContainmentLookup {
 public:
  // `reader` is borrowed and must use its stored banding. Requires a
  // containment `match`. With `earlier` (a lookup of the same reader and
  // match, built before the reader caught up), the table of the documents
  // it covers is shared and only the documents added since are computed.
  static std::unique_ptr<ContainmentLookup> Create(const IndexReader& reader,
                                                   const MatchSettings& match,
                                                   const ContainmentLookup* earlier = nullptr);

  // Whether the index's stored keys answer a containment `match` (false:
  // a table built in memory).
  static bool UsesStoredKeys(const IndexReader& reader, const MatchSettings& match);

  // Whether the index's stored keys answer (false: the in-memory table).
  bool stored() const { return stored_; }
  // The documents 0..covered()-1 are in the in-memory table.
  uint32_t covered() const { return covered_; }
  const ContainmentPlan& plan() const { return *plan_; }

  // Appends to *out the live documents proposed for a query document of
  // `shingle_count` shingles with this signature, ascending and without
  // repeats. A key shared by more than `max_bucket` indexed documents (0:
  // no cap) proposes only its first live one and is counted in *crowded.
  void Candidates(absl::Span<const uint32_t> signature, uint32_t shingle_count, uint64_t max_bucket,
                  std::vector<uint32_t>* out, uint64_t* crowded) const;

 private:
  ContainmentLookup(const IndexReader& reader, const ContainmentKeys& keys,
                    std::shared_ptr<const ContainmentPlan> plan, bool stored)
      : reader_(reader), keys_(keys), plan_(std::move(plan)), stored_(stored) {}
  // The live documents with `key`, capped as Candidates() says.
  void Lookup(uint64_t key, uint64_t max_bucket, std::vector<uint32_t>* out,
              uint64_t* crowded) const;

  // The sorted table of the keys (stored banding and this lookup's
  // containment keys) of documents [from, to).
  KeyTable BuildTable(uint32_t from, uint32_t to) const;

  const IndexReader& reader_;
  ContainmentKeys keys_;
  std::shared_ptr<const ContainmentPlan> plan_;
  bool stored_;
  uint32_t covered_ = 0;
  // Every indexed document's keys (live or retired, which Lookup skips):
  // a large table shared between the lookups of one reader, and the keys
  // of the documents added since it was built.
  std::shared_ptr<const KeyTable> base_;
  KeyTable recent_;
};

// The containment lookups of one reader, by threshold and least contained
// size. Thread-safe.
class ContainmentLookupCache {
 public:
  // The lookup for `match` on `reader` (the reader that owns this cache),
  // built or extended when the reader holds documents it does not cover.
  std::shared_ptr<const ContainmentLookup> For(const IndexReader& reader,
                                               const MatchSettings& match);
  // In-memory tables built or extended so far.
  uint64_t tables_built() const;

 private:
  mutable std::mutex mu_;
  uint64_t tables_built_ = 0;
  std::map<std::pair<double, uint32_t>, std::shared_ptr<const ContainmentLookup>> lookups_;
};

}  // namespace kindred::index

#endif  // KINDRED_INDEX_CONTAINMENT_LOOKUP_H_
