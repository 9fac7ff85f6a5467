// kindred: scored pairs, the record of the verification stage.
//
// A ScoredPair is a pair of documents measured on their exact shingle sets:
// the two documents, the exact counts every measure derives from, the exact
// Jaccard similarity and the MinHash estimate. It is the one pair type of
// the library: verification (verify.h), grouping, output records, index
// matches (a match holds one; index_match.h), explain and tune all use it.
// In a sweep's list of pairs, a < b are document numbers in first-seen
// order; other users say what a and b number.
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

// A measured pair of documents (a < b in a sweep's list of pairs).
struct ScoredPair {
  uint32_t a = 0;
  uint32_t b = 0;
  uint32_t shared = 0;  // |A n B| (exact)
  uint32_t size_a = 0;  // |A|
  uint32_t size_b = 0;  // |B|
  // |A n B| / |A u B|, exact; 0 when both sets are empty (an empty document
  // is never anyone's duplicate).
  double jaccard = 0;
  double estimate = 0;  // MinHash signature estimate (0 where not signed)

  // |A n B| / |A|: how much of A lies inside B; 0 when A is empty.
  double ContainmentOfAInB() const { return size_a == 0 ? 0.0 : double(shared) / size_a; }
  // |A n B| / |B|; 0 when B is empty.
  double ContainmentOfBInA() const { return size_b == 0 ? 0.0 : double(shared) / size_b; }
  // |A n B| / min(|A|, |B|): the larger of the two containments.
  double Containment() const {
    const double x = ContainmentOfAInB(), y = ContainmentOfBInA();
    return x > y ? x : y;
  }

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
