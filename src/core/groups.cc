#include "kindred/groups.h"

#include <algorithm>
#include <numeric>

#include "absl/strings/str_cat.h"
#include "core/parallel.h"

namespace kindred {
namespace {

// Union-find with path halving and union by smaller root index, so the
// representative of a component is always its smallest member.
class UnionFind {
 public:
  explicit UnionFind(size_t n) : parent_(n) { std::iota(parent_.begin(), parent_.end(), 0u); }

  uint32_t Find(uint32_t x) {
    while (parent_[x] != x) {
      parent_[x] = parent_[parent_[x]];
      x = parent_[x];
    }
    return x;
  }

  void Unite(uint32_t x, uint32_t y) {
    x = Find(x);
    y = Find(y);
    if (x == y) return;
    if (x < y) std::swap(x, y);
    parent_[x] = y;
  }

 private:
  std::vector<uint32_t> parent_;
};

// True when `candidate` should replace `best` as keeper. Members arrive in
// ascending order, so keeping the incumbent on ties favours the first seen.
bool Better(const KeepFacts& candidate, const KeepFacts& best, KeepPolicy policy) {
  switch (policy) {
    case KeepPolicy::kFirst:
      return false;
    case KeepPolicy::kLongest:
      return candidate.length > best.length;
    case KeepPolicy::kPriority:
      if (candidate.has_priority != best.has_priority) return candidate.has_priority;
      return candidate.priority > best.priority;
  }
  return false;
}

// The documents of `pairs`, ascending, without repeats.
std::vector<uint32_t> PairedDocuments(absl::Span<const ScoredPair> pairs, int threads) {
  std::vector<uint32_t> docs(2 * pairs.size());
  for (size_t i = 0; i < pairs.size(); ++i) {
    docs[2 * i] = pairs[i].a;
    docs[2 * i + 1] = pairs[i].b;
  }
  ParallelSort(docs.begin(), docs.end(), std::less<uint32_t>(), threads);
  docs.erase(std::unique(docs.begin(), docs.end()), docs.end());
  return docs;
}

uint32_t IndexOf(const std::vector<uint32_t>& docs, uint32_t doc) {
  return static_cast<uint32_t>(std::lower_bound(docs.begin(), docs.end(), doc) - docs.begin());
}

// The two documents of each pair as indices into `docs` (PairedDocuments):
// pair i is (ends[2i], ends[2i + 1]).
std::vector<uint32_t> PairEnds(absl::Span<const ScoredPair> pairs,
                               const std::vector<uint32_t>& docs, int threads) {
  std::vector<uint32_t> ends(2 * pairs.size());
  ParallelFor(pairs.size(), threads, [&](size_t begin, size_t end, int) {
    for (size_t i = begin; i < end; ++i) {
      ends[2 * i] = IndexOf(docs, pairs[i].a);
      ends[2 * i + 1] = IndexOf(docs, pairs[i].b);
    }
  });
  return ends;
}

// Groups around keepers (Grouping::kKeepers). `docs` from PairedDocuments.
// `ends` from PairEnds.
std::vector<Group> GroupAroundKeepers(absl::Span<const KeepFacts> facts, KeepPolicy policy,
                                      const std::vector<uint32_t>& docs,
                                      const std::vector<uint32_t>& ends) {
  // Partners of each document, as compact indices (CSR).
  std::vector<uint32_t> start(docs.size() + 1, 0);
  for (const uint32_t end : ends) ++start[end + 1];
  for (size_t i = 1; i < start.size(); ++i) start[i] += start[i - 1];
  std::vector<uint32_t> partners(start.back()), fill(start.begin(), start.end() - 1);
  for (size_t i = 0; i < ends.size(); i += 2) {
    const uint32_t a = ends[i], b = ends[i + 1];
    partners[fill[a]++] = b;
    partners[fill[b]++] = a;
  }
  // Keep-policy order: the best first, ties to the first seen.
  std::vector<uint32_t> order(docs.size());
  std::iota(order.begin(), order.end(), 0u);
  std::stable_sort(order.begin(), order.end(), [&](uint32_t x, uint32_t y) {
    return Better(facts[docs[x]], facts[docs[y]], policy);
  });
  constexpr uint32_t kNone = ~uint32_t{0};
  std::vector<uint32_t> keeper_of(docs.size(), kNone);
  std::vector<Group> groups;
  for (uint32_t keeper : order) {
    if (keeper_of[keeper] != kNone) continue;
    keeper_of[keeper] = keeper;
    Group group{docs[keeper], {docs[keeper]}};
    for (uint32_t i = start[keeper]; i < start[keeper + 1]; ++i) {
      const uint32_t partner = partners[i];
      if (keeper_of[partner] != kNone) continue;
      keeper_of[partner] = keeper;
      group.members.push_back(docs[partner]);
    }
    if (group.members.size() < 2) continue;
    std::sort(group.members.begin(), group.members.end());
    groups.push_back(std::move(group));
  }
  std::sort(groups.begin(), groups.end(),
            [](const Group& x, const Group& y) { return x.members[0] < y.members[0]; });
  return groups;
}

}  // namespace

absl::StatusOr<Grouping> ParseGrouping(std::string_view name) {
  if (name == "components") return Grouping::kComponents;
  if (name == "keepers") return Grouping::kKeepers;
  return absl::InvalidArgumentError(absl::StrCat("unknown grouping \"", std::string(name),
                                                 "\" (expected components or keepers)"));
}

const char* GroupingName(Grouping grouping) {
  return grouping == Grouping::kKeepers ? "keepers" : "components";
}

absl::StatusOr<KeepPolicy> ParseKeepPolicy(std::string_view name) {
  if (name == "first") return KeepPolicy::kFirst;
  if (name == "longest") return KeepPolicy::kLongest;
  if (name == "priority") return KeepPolicy::kPriority;
  return absl::InvalidArgumentError(absl::StrCat("unknown keep policy \"", std::string(name),
                                                 "\" (expected first, longest or priority)"));
}

const char* KeepPolicyName(KeepPolicy policy) {
  switch (policy) {
    case KeepPolicy::kFirst:
      return "first";
    case KeepPolicy::kLongest:
      return "longest";
    case KeepPolicy::kPriority:
      return "priority";
  }
  return "?";
}

std::vector<Group> GroupPairs(absl::Span<const ScoredPair> pairs, absl::Span<const KeepFacts> facts,
                              KeepPolicy policy, Grouping grouping, int threads) {
  // Only documents in a pair can be in a group: the union-find runs over
  // them alone (numbered in document order, so roots stay the smallest
  // members), and the work and memory follow the pairs, not the corpus.
  // Sorting and numbering run on all threads, the union-find on one.
  const std::vector<uint32_t> docs = PairedDocuments(pairs, threads);
  const std::vector<uint32_t> ends = PairEnds(pairs, docs, threads);
  if (grouping == Grouping::kKeepers) return GroupAroundKeepers(facts, policy, docs, ends);
  UnionFind components(docs.size());
  for (size_t i = 0; i < ends.size(); i += 2) components.Unite(ends[i], ends[i + 1]);

  // Visiting documents in order yields groups ordered by their smallest
  // member, members ascending.
  std::vector<int64_t> group_of_root(docs.size(), -1);
  std::vector<Group> groups;
  for (uint32_t i = 0; i < docs.size(); ++i) {
    const uint32_t doc = docs[i];
    const uint32_t root = components.Find(i);
    if (group_of_root[root] < 0) {
      group_of_root[root] = static_cast<int64_t>(groups.size());
      groups.push_back(Group{doc, {}});
    }
    Group& group = groups[group_of_root[root]];
    group.members.push_back(doc);
    if (Better(facts[doc], facts[group.keeper], policy)) group.keeper = doc;
  }
  return groups;
}

}  // namespace kindred
