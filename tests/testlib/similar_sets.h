// Test-only: pairs of shingle sets with an exactly known Jaccard similarity,
// drawn from a deterministic generator.
#ifndef KINDRED_TESTS_TESTLIB_SIMILAR_SETS_H_
#define KINDRED_TESTS_TESTLIB_SIMILAR_SETS_H_

#include <cstdint>
#include <vector>

namespace kindred::testing {

// SplitMix64 (Steele, Lea, Flood 2014): a small, seeded, portable generator.
class SplitMix64 {
 public:
  explicit SplitMix64(uint64_t seed) : state_(seed) {}
  uint64_t Next();
  // Uniform in [low, high] (inclusive; high - low < 2^32).
  uint64_t Between(uint64_t low, uint64_t high);

 private:
  uint64_t state_;
};

struct SetPair {
  std::vector<uint64_t> a;  // sorted, distinct
  std::vector<uint64_t> b;  // sorted, distinct
  uint64_t intersection = 0;
  uint64_t union_size = 0;
};

// Two sets whose union has `union_size` distinct random 64-bit elements, of
// which `intersection` are in both; the rest are split between the two at
// random. Jaccard = intersection / union_size exactly.
// Requires intersection <= union_size.
SetPair MakeSetPair(SplitMix64& random, uint64_t union_size, uint64_t intersection);

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_SIMILAR_SETS_H_
