// kindred: exact verification of a candidate pair on its shingle sets.
//
// Every pair kindred reports is confirmed here, on the full sets of 64-bit
// shingle hashes, never on signatures alone. Sets are sorted ascending and hold
// no repeats (the ShingleSet contract of shingles.h).
//
// Pure functions over borrowed spans; thread-safe.
#ifndef KINDRED_VERIFY_H_
#define KINDRED_VERIFY_H_

#include <cstdint>

#include "absl/types/span.h"
#include "kindred/settings.h"

namespace kindred {

// The sizes that every exact measure derives from.
struct Overlap {
  uint32_t shared = 0;  // |A n B|
  uint32_t size_a = 0;  // |A|
  uint32_t size_b = 0;  // |B|

  // |A n B| / |A u B|; 0 when both sets are empty (an empty document is
  // never anyone's duplicate).
  double Jaccard() const;
  // |A n B| / |A|: how much of A lies inside B; 0 when A is empty.
  double ContainmentOfAInB() const;
  // |A n B| / |B|; 0 when B is empty.
  double ContainmentOfBInA() const;
  // |A n B| / min(|A|, |B|): the larger of the two containments.
  double Containment() const;
};

// Counts the shared hashes of two sorted, repeat-free sets. Linear merge for
// sets of similar size, galloping search when one is much smaller.
Overlap MeasureOverlap(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b);

// Like MeasureOverlap, but gives up (returns false, *out partly filled) as
// soon as fewer than `needed` shared hashes remain possible: the shared
// count so far plus what is left of the shorter remainder. This is the
// overlap bound of prefix filtering (Chaudhuri, Ganti, Kaushik 2006, "A
// Primitive Operator for Similarity Joins in Data Cleaning"; Xiao, Wang,
// Lin, Yu 2008, "Efficient Similarity Joins for Near Duplicate Detection",
// PPJoin): a pair that cannot reach the threshold stops early. Returns true
// with the exact overlap otherwise.
bool MeasureOverlapAtLeast(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b,
                           uint32_t needed, Overlap* out);

// True when `overlap` passes `match` (measure >= threshold, compared exactly
// on the counts, with a 1e-9 allowance for the decimal threshold; for
// containment, the smaller set also has at least match.min_contained_size
// shingles).
bool PassesThreshold(uint32_t shared, uint32_t size_a, uint32_t size_b, const MatchSettings& match);

}  // namespace kindred

#endif  // KINDRED_VERIFY_H_
