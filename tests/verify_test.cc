// Exact overlap of shingle sets, checked against std::set_intersection (the
// standard library's independent computation) on random sets.
#include "kindred/verify.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <iterator>

#include "testlib/similar_sets.h"

namespace kindred {
namespace {

using testing::SplitMix64;

std::vector<uint64_t> RandomSet(SplitMix64& random, size_t size, uint64_t range) {
  std::vector<uint64_t> set;
  for (size_t i = 0; i < size; ++i) set.push_back(random.Next() % range);
  std::sort(set.begin(), set.end());
  set.erase(std::unique(set.begin(), set.end()), set.end());
  return set;
}

TEST_CASE("MeasureOverlap agrees with std::set_intersection", "[verify]") {
  SplitMix64 random(7);
  // Sizes chosen to exercise the merge path (similar sizes) and the galloping
  // path (one set 16+ times smaller), over a small range so sets overlap.
  const std::vector<std::pair<size_t, size_t>> sizes = {
      {0, 0}, {0, 5}, {1, 1}, {10, 12}, {100, 90}, {3, 500}, {500, 3}, {20, 2000}, {1000, 1000}};
  for (const auto& [size_a, size_b] : sizes) {
    for (uint64_t range : {8ull, 100ull, 5000ull}) {
      const auto a = RandomSet(random, size_a, range);
      const auto b = RandomSet(random, size_b, range);
      std::vector<uint64_t> common;
      std::set_intersection(a.begin(), a.end(), b.begin(), b.end(), std::back_inserter(common));
      const ScoredPair overlap = MeasureOverlap(a, b);
      INFO("sizes " << a.size() << " and " << b.size() << ", range " << range);
      CHECK(overlap.shared == common.size());
      CHECK(overlap.size_a == a.size());
      CHECK(overlap.size_b == b.size());
    }
  }
}

TEST_CASE("Jaccard and containment follow their definitions", "[verify]") {
  ScoredPair overlap;  // |A n B| = 3, |A u B| = 7
  overlap.shared = 3;
  overlap.size_a = 4;
  overlap.size_b = 6;
  CHECK(JaccardOf(3, 4, 6) == Approx(3.0 / 7.0));
  CHECK(overlap.ContainmentOfAInB() == Approx(0.75));
  CHECK(overlap.ContainmentOfBInA() == Approx(0.5));
  CHECK(overlap.Containment() == Approx(0.75));
}

TEST_CASE("Two empty sets have Jaccard 0, never 1", "[verify]") {
  const std::vector<uint64_t> empty;
  const ScoredPair overlap = MeasureOverlap(empty, empty);
  CHECK(overlap.jaccard == 0.0);
  CHECK(overlap.Containment() == 0.0);
}

TEST_CASE("Identical sets have Jaccard 1", "[verify]") {
  const std::vector<uint64_t> set = {1, 5, 9, 1ull << 63, ~0ull};
  CHECK(MeasureOverlap(set, set).jaccard == 1.0);
}

TEST_CASE("Pairs with known Jaccard measure exactly", "[verify]") {
  SplitMix64 random(11);
  for (uint64_t intersection : {0, 1, 37, 250, 400}) {
    const auto pair = testing::MakeSetPair(random, 400, intersection);
    const ScoredPair overlap = MeasureOverlap(pair.a, pair.b);
    CHECK(overlap.shared == intersection);
    CHECK(overlap.jaccard == Approx(static_cast<double>(intersection) / 400));
  }
}

}  // namespace
}  // namespace kindred

namespace kindred {
namespace {

TEST_CASE("MeasureOverlapAtLeast stops only pairs that cannot reach the bound", "[verify]") {
  SplitMix64 random(11);
  const std::vector<std::pair<size_t, size_t>> sizes = {
      {1, 1}, {10, 12}, {100, 90}, {300, 280}, {3, 500}, {500, 3}, {20, 2000}, {1000, 1000}};
  for (const auto& [size_a, size_b] : sizes) {
    for (int trial = 0; trial < 20; ++trial) {
      const auto a = RandomSet(random, size_a, 1500);
      const auto b = RandomSet(random, size_b, 1500);
      const ScoredPair exact = MeasureOverlap(a, b);
      for (uint32_t needed : {0u, 1u, exact.shared, exact.shared + 1, exact.shared + 50}) {
        ScoredPair bounded;
        const bool reached = MeasureOverlapAtLeast(a, b, needed, &bounded);
        CHECK(reached == (exact.shared >= needed));
        if (reached) {
          CHECK(bounded.shared == exact.shared);
          CHECK(bounded.size_a == exact.size_a);
          CHECK(bounded.size_b == exact.size_b);
        }
      }
    }
  }
}

}  // namespace
}  // namespace kindred
