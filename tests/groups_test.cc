// Grouping confirmed pairs: union-find components against a breadth-first
// search oracle, and the keep policies.
#include "kindred/groups.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <map>
#include <queue>
#include <set>
#include <tuple>

#include "core/parallel.h"
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

TEST_CASE("Around keepers, chained pairs split and every drop is confirmed with its keeper",
          "[groups]") {
  // A chain 0-1-2-3: one component, but 0 and 2 (and 0 and 3) are no pair.
  const std::vector<ScoredPair> pairs = {Pair(0, 1), Pair(1, 2), Pair(2, 3)};
  std::vector<KeepFacts> facts(4);
  auto groups = GroupPairs(pairs, facts, KeepPolicy::kFirst, Grouping::kComponents);
  REQUIRE(groups.size() == 1);
  CHECK(groups[0].members == std::vector<uint32_t>{0, 1, 2, 3});

  groups = GroupPairs(pairs, facts, KeepPolicy::kFirst, Grouping::kKeepers);
  REQUIRE(groups.size() == 2);  // 0 takes 1; then 2 takes 3
  CHECK(groups[0].keeper == 0);
  CHECK(groups[0].members == std::vector<uint32_t>{0, 1});
  CHECK(groups[1].keeper == 2);
  CHECK(groups[1].members == std::vector<uint32_t>{2, 3});

  facts[1].length = 10;  // 1 is the longest: it takes 0 and 2; 3 is left alone
  groups = GroupPairs(pairs, facts, KeepPolicy::kLongest, Grouping::kKeepers);
  REQUIRE(groups.size() == 1);
  CHECK(groups[0].keeper == 1);
  CHECK(groups[0].members == std::vector<uint32_t>{0, 1, 2});
}

// Oracle for grouping around keepers, written plainly: repeatedly pick the
// best document (by the policy, ties to the first seen) that is in a pair and
// in no group yet, and give it every such partner.
std::vector<Group> KeepersByScan(size_t n, const std::vector<ScoredPair>& pairs,
                                 const std::vector<KeepFacts>& facts, KeepPolicy policy) {
  std::set<std::pair<uint32_t, uint32_t>> edges;
  std::vector<bool> paired(n, false), taken(n, false);
  for (const ScoredPair& pair : pairs) {
    edges.insert({pair.a, pair.b});
    edges.insert({pair.b, pair.a});
    paired[pair.a] = paired[pair.b] = true;
  }
  const auto rank = [&](uint32_t doc) {
    const KeepFacts& f = facts[doc];
    switch (policy) {
      case KeepPolicy::kLongest:
        return std::make_tuple(1.0, static_cast<double>(f.length));
      case KeepPolicy::kPriority:
        return std::make_tuple(f.has_priority ? 1.0 : 0.0, f.has_priority ? f.priority : 0.0);
      default:
        return std::make_tuple(0.0, 0.0);
    }
  };
  std::vector<Group> groups;
  for (;;) {
    int64_t best = -1;
    for (uint32_t doc = 0; doc < n; ++doc) {
      if (!paired[doc] || taken[doc]) continue;
      if (best < 0 || rank(doc) > rank(static_cast<uint32_t>(best))) best = doc;
    }
    if (best < 0) break;
    const uint32_t keeper = static_cast<uint32_t>(best);
    taken[keeper] = true;
    Group group{keeper, {}};
    for (uint32_t doc = 0; doc < n; ++doc) {
      if (doc == keeper || (!taken[doc] && edges.count({keeper, doc}))) {
        taken[doc] = true;
        group.members.push_back(doc);
      }
    }
    if (group.members.size() >= 2) groups.push_back(group);
  }
  std::sort(groups.begin(), groups.end(),
            [](const Group& x, const Group& y) { return x.members[0] < y.members[0]; });
  return groups;
}

TEST_CASE("Grouping around keepers matches a plain scan on random graphs", "[groups]") {
  testing::SplitMix64 random(11);
  for (int trial = 0; trial < 60; ++trial) {
    const size_t n = random.Between(2, 120);
    const size_t edges = random.Between(0, 2 * n);
    std::vector<ScoredPair> pairs;
    std::set<std::pair<uint32_t, uint32_t>> seen;
    for (size_t e = 0; e < edges; ++e) {
      const uint32_t a = static_cast<uint32_t>(random.Between(0, n - 1));
      const uint32_t b = static_cast<uint32_t>(random.Between(0, n - 1));
      if (a == b || !seen.insert({std::min(a, b), std::max(a, b)}).second) continue;
      pairs.push_back(Pair(a, b));
    }
    std::vector<KeepFacts> facts(n);
    for (KeepFacts& f : facts) {
      f.length = random.Between(0, 5);  // small ranges: many ties
      f.has_priority = random.Between(0, 3) != 0;
      f.priority = f.has_priority ? static_cast<double>(random.Between(0, 4)) : 0;  // as read
    }
    for (KeepPolicy policy : {KeepPolicy::kFirst, KeepPolicy::kLongest, KeepPolicy::kPriority}) {
      const std::vector<Group> groups = GroupPairs(pairs, facts, policy, Grouping::kKeepers);
      const std::vector<Group> want = KeepersByScan(n, pairs, facts, policy);
      REQUIRE(groups.size() == want.size());
      for (size_t g = 0; g < groups.size(); ++g) {
        CHECK(groups[g].keeper == want[g].keeper);
        CHECK(groups[g].members == want[g].members);
        for (uint32_t member : groups[g].members) {  // each drop paired with its keeper
          if (member == groups[g].keeper) continue;
          CHECK(seen.count({std::min(member, groups[g].keeper), std::max(member, groups[g].keeper)}));
        }
      }
    }
  }
}

// Grouping sorts with ParallelSort; on its own first: what std::sort gives,
// for sizes around the piece size and any thread count.
TEST_CASE("A parallel sort gives what std::sort gives", "[groups]") {
  testing::SplitMix64 random(5);
  for (size_t n : {size_t{0}, size_t{1}, kParallelSortPiece - 1, 2 * kParallelSortPiece + 3,
                   5 * kParallelSortPiece + 1}) {
    std::vector<uint64_t> values(n);
    for (uint64_t& value : values) value = random.Between(0, n / 2 + 1);  // repeats
    std::vector<uint64_t> want = values;
    std::sort(want.begin(), want.end());
    for (int threads : {1, 2, 3, 7}) {
      std::vector<uint64_t> got = values;
      ParallelSort(got.begin(), got.end(), std::less<uint64_t>(), threads);
      CHECK(got == want);
    }
  }
}

// Enough pairs that grouping sorts and numbers them on several threads.
TEST_CASE("Grouping on several threads gives the groups of one", "[groups]") {
  testing::SplitMix64 random(17);
  const size_t n = 30000;
  std::vector<ScoredPair> pairs;
  std::set<std::pair<uint32_t, uint32_t>> seen;
  while (pairs.size() < 3 * kParallelSortPiece) {
    const auto a = static_cast<uint32_t>(random.Between(0, n - 1));
    const auto b = static_cast<uint32_t>(random.Between(0, n - 1));
    if (a == b || !seen.insert({std::min(a, b), std::max(a, b)}).second) continue;
    pairs.push_back(Pair(std::min(a, b), std::max(a, b)));
  }
  std::vector<KeepFacts> facts(n);
  for (KeepFacts& f : facts) f.length = random.Between(0, 5);
  const std::vector<std::vector<uint32_t>> components = ComponentsByBfs(n, pairs);
  for (Grouping grouping : {Grouping::kComponents, Grouping::kKeepers}) {
    const std::vector<Group> one = GroupPairs(pairs, facts, KeepPolicy::kLongest, grouping, 1);
    if (grouping == Grouping::kComponents) {
      REQUIRE(one.size() == components.size());
      for (size_t g = 0; g < one.size(); ++g) CHECK(one[g].members == components[g]);
    }
    for (int threads : {2, 3, 4}) {
      const std::vector<Group> many =
          GroupPairs(pairs, facts, KeepPolicy::kLongest, grouping, threads);
      REQUIRE(many.size() == one.size());
      for (size_t g = 0; g < one.size(); ++g) {
        CHECK(many[g].keeper == one[g].keeper);
        CHECK(many[g].members == one[g].members);
      }
    }
  }
}

TEST_CASE("Grouping names parse and print", "[groups]") {
  for (Grouping grouping : {Grouping::kComponents, Grouping::kKeepers}) {
    auto parsed = ParseGrouping(GroupingName(grouping));
    REQUIRE(parsed.ok());
    CHECK(*parsed == grouping);
  }
  CHECK(!ParseGrouping("chains").ok());
}

TEST_CASE("No pairs, no groups", "[groups]") {
  const std::vector<KeepFacts> facts(10);
  CHECK(GroupPairs({}, facts, KeepPolicy::kFirst).empty());
}

}  // namespace
}  // namespace kindred
