#include "kindred/groups.h"

#include <algorithm>
#include <numeric>

#include "absl/strings/str_cat.h"

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

}  // namespace

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
                              KeepPolicy policy) {
  // Only documents in a pair can be in a group: the union-find runs over
  // them alone (numbered in document order, so roots stay the smallest
  // members), and the work and memory follow the pairs, not the corpus.
  std::vector<uint32_t> docs;
  docs.reserve(2 * pairs.size());
  for (const ScoredPair& pair : pairs) {
    docs.push_back(pair.a);
    docs.push_back(pair.b);
  }
  std::sort(docs.begin(), docs.end());
  docs.erase(std::unique(docs.begin(), docs.end()), docs.end());
  const auto index_of = [&docs](uint32_t doc) {
    return static_cast<uint32_t>(std::lower_bound(docs.begin(), docs.end(), doc) - docs.begin());
  };
  UnionFind components(docs.size());
  for (const ScoredPair& pair : pairs) components.Unite(index_of(pair.a), index_of(pair.b));

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
