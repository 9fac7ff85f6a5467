// kindred: scored pairs, the record of the verification stage.
//
// A ScoredPair is a candidate pair confirmed on the exact shingle sets: the
// two documents (numbers in first-seen order, a < b), the exact counts every
// measure derives from, the exact Jaccard similarity and the MinHash
// estimate. It is the one pair type of the library: verification, grouping,
// output records and index matches all use it.
//
// The serialized form (a list of pairs, ascending by (a, b)) is documented
// in src/core/RECORDS.md; the two similarities travel as their IEEE 754 bits,
// so a parsed pair is equal to the one written. Plain data.
#ifndef KINDRED_SCORED_PAIRS_H_
#define KINDRED_SCORED_PAIRS_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"

namespace kindred {

// A confirmed pair of documents, a < b (indices in first-seen order).
struct ScoredPair {
  uint32_t a = 0;
  uint32_t b = 0;
  uint32_t shared = 0;  // |A n B| (exact)
  uint32_t size_a = 0;  // |A|
  uint32_t size_b = 0;  // |B|
  double jaccard = 0;   // exact
  double estimate = 0;  // MinHash signature estimate

  friend bool operator==(const ScoredPair&, const ScoredPair&) = default;
};

std::string SerializeScoredPairs(absl::Span<const ScoredPair> pairs);
// Errors: BadInput when `bytes` are not a whole, intact record, or its pairs
// are not ascending by (a, b) with a < b.
absl::StatusOr<std::vector<ScoredPair>> ParseScoredPairs(std::string_view bytes);

// Lists of scored pairs (each ascending, e.g. one per part of the candidate
// pairs) merged into one ascending list; a pair in two lists is kept once.
std::vector<ScoredPair> MergeScoredPairs(absl::Span<const std::vector<ScoredPair>> parts);

}  // namespace kindred

#endif  // KINDRED_SCORED_PAIRS_H_
