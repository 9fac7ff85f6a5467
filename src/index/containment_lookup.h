// The containment search of a query document against an index: the live
// indexed documents that LSH Ensemble proposes (containment_keys.h), from
// the index's stored containment keys when they were stored for the query's
// threshold and least contained size, else from a table of every live
// document's containment keys built in memory from the stored signatures.
//
// Immutable after Create(); Candidates() may be called concurrently.
#ifndef KINDRED_INDEX_CONTAINMENT_LOOKUP_H_
#define KINDRED_INDEX_CONTAINMENT_LOOKUP_H_

#include <cstdint>
#include <memory>
#include <utility>
#include <vector>

#include "absl/types/span.h"
#include "kindred/containment_lsh.h"
#include "kindred/index.h"
#include "kindred/settings.h"

namespace kindred::index {

class ContainmentLookup {
 public:
  // `reader` is borrowed and must use its stored banding. Requires a
  // containment `match`.
  static std::unique_ptr<ContainmentLookup> Create(const IndexReader& reader,
                                                   const MatchSettings& match);

  // Whether the index's stored keys answer a containment `match` (false:
  // a table built in memory).
  static bool UsesStoredKeys(const IndexReader& reader, const MatchSettings& match);

  // Whether the index's stored keys answer (false: the in-memory table).
  bool stored() const { return stored_; }
  const ContainmentPlan& plan() const { return *plan_; }

  // Appends to *out the live documents proposed for a query document of
  // `shingle_count` shingles with this signature, ascending and without
  // repeats. A key shared by more than `max_bucket` indexed documents (0:
  // no cap) proposes only its first live one and is counted in *crowded.
  void Candidates(absl::Span<const uint32_t> signature, uint32_t shingle_count, uint64_t max_bucket,
                  std::vector<uint32_t>* out, uint64_t* crowded) const;

 private:
  ContainmentLookup(const IndexReader& reader, std::shared_ptr<const ContainmentPlan> plan,
                    bool stored)
      : reader_(reader), plan_(std::move(plan)), stored_(stored) {}
  // The live documents with `key`, capped as Candidates() says.
  void Lookup(uint64_t key, uint64_t max_bucket, std::vector<uint32_t>* out,
              uint64_t* crowded) const;

  const IndexReader& reader_;
  std::shared_ptr<const ContainmentPlan> plan_;
  bool stored_;
  std::vector<std::pair<uint64_t, uint32_t>> memory_;  // (key, doc), sorted
};

}  // namespace kindred::index

#endif  // KINDRED_INDEX_CONTAINMENT_LOOKUP_H_
