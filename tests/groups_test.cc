// Grouping confirmed pairs: union-find components against a breadth-first
// search oracle, and the keep policies.
#include "kindred/groups.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <map>
#include <queue>
#include <set>

#include "testlib/similar_sets.h"

namespace kindred {
namespace {

// Oracle: connected components by breadth-first search over an adjacency
// list, members sorted, components sorted by smallest member.
std::vector<std::vector<uint32_t>> ComponentsByBfs(size_t n, const std::vector<ScoredPair>& pairs) {
  std::vector<std::vector<uint32_t>> adjacent(n);
  for (const ScoredPair& pair : pairs) {
    adjacent[pair.a].push_back(pair.b);
    adjacent[pair.b].push_back(pair.a);
  }
  std::vector<bool> seen(n, false);
  std::vector<std::vector<uint32_t>> components;
  for (uint32_t start = 0; start < n; ++start) {
    if (seen[start] || adjacent[start].empty()) continue;
    std::vector<uint32_t> component;
    std::queue<uint32_t> queue;
    queue.push(start);
    seen[start] = true;
    while (!queue.empty()) {
      const uint32_t doc = queue.front();
      queue.pop();
      component.push_back(doc);
      for (uint32_t next : adjacent[doc]) {
        if (!seen[next]) {
          seen[next] = true;
          queue.push(next);
        }
      }
    }
    std::sort(component.begin(), component.end());
    components.push_back(component);
  }
  return components;
}

ScoredPair Pair(uint32_t a, uint32_t b) {
  ScoredPair pair;
  pair.a = std::min(a, b);
  pair.b = std::max(a, b);
  return pair;
}

TEST_CASE("Groups are the connected components of the pair graph", "[groups]") {
  testing::SplitMix64 random(3);
  for (int trial = 0; trial < 50; ++trial) {
    const size_t n = random.Between(2, 300);
    const size_t edges = random.Between(0, n);
    std::vector<ScoredPair> pairs;
    for (size_t e = 0; e < edges; ++e) {
      const uint32_t a = random.Between(0, n - 1);
      const uint32_t b = random.Between(0, n - 1);
      if (a != b) pairs.push_back(Pair(a, b));
    }
    const std::vector<KeepFacts> facts(n);
    const auto groups = GroupPairs(pairs, facts, KeepPolicy::kFirst);
    const auto expected = ComponentsByBfs(n, pairs);
    REQUIRE(groups.size() == expected.size());
    for (size_t g = 0; g < groups.size(); ++g) {
      CHECK(groups[g].members == expected[g]);
      CHECK(groups[g].keeper == expected[g].front());  // first seen
    }
  }
}

TEST_CASE("Keep policies choose the keeper, ties to the first seen", "[groups]") {
  const std::vector<ScoredPair> pairs = {Pair(0, 1), Pair(1, 2), Pair(3, 4)};
  std::vector<KeepFacts> facts(5);
  facts[0] = {100, 0, false};
  facts[1] = {300, 5, true};
  facts[2] = {300, 9, true};
  facts[3] = {50, 1, true};
  facts[4] = {60, 0, false};

  auto groups = GroupPairs(pairs, facts, KeepPolicy::kFirst);
  REQUIRE(groups.size() == 2);
  CHECK(groups[0].keeper == 0);
  CHECK(groups[1].keeper == 3);

  groups = GroupPairs(pairs, facts, KeepPolicy::kLongest);
  CHECK(groups[0].keeper == 1);  // 1 and 2 tie at 300 bytes: 1 was seen first
  CHECK(groups[1].keeper == 4);

  groups = GroupPairs(pairs, facts, KeepPolicy::kPriority);
  CHECK(groups[0].keeper == 2);  // highest priority
  CHECK(groups[1].keeper == 3);  // a priority beats none
}

TEST_CASE("Keep policy names parse and print", "[groups]") {
  for (KeepPolicy policy : {KeepPolicy::kFirst, KeepPolicy::kLongest, KeepPolicy::kPriority}) {
    auto parsed = ParseKeepPolicy(KeepPolicyName(policy));
    REQUIRE(parsed.ok());
    CHECK(*parsed == policy);
  }
  CHECK(!ParseKeepPolicy("newest").ok());
}

TEST_CASE("No pairs, no groups", "[groups]") {
  const std::vector<KeepFacts> facts(10);
  CHECK(GroupPairs({}, facts, KeepPolicy::kFirst).empty());
}

}  // namespace
}  // namespace kindred
