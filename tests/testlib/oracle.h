// Test-only: the brute-force oracle. Exact Jaccard of every pair of shingle
// sets with std::set_intersection, no pruning, no LSH: slow and obviously
// correct, the reference the fast paths are checked against.
#ifndef KINDRED_TESTS_TESTLIB_ORACLE_H_
#define KINDRED_TESTS_TESTLIB_ORACLE_H_

#include <cstdint>
#include <vector>

namespace kindred::testing {

struct OraclePair {
  uint32_t a, b;  // a < b
  double jaccard;
};

// Every pair (a < b) whose Jaccard is >= threshold, ascending by (a, b).
// Empty sets match nothing.
std::vector<OraclePair> AllPairsAtLeast(const std::vector<std::vector<uint64_t>>& sets,
                                        double threshold);

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_ORACLE_H_
