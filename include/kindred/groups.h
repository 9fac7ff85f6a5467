// kindred: grouping confirmed pairs and choosing what to keep.
//
// Two groupings of the graph whose edges are the confirmed pairs:
//   - components (the default): a group is a connected component
//     (union-find). One member is the keeper, chosen by a keep policy; the
//     other members are drops. Pairs chain: a drop need not be confirmed
//     with its keeper.
//   - keepers: every drop is confirmed with its keeper. Documents are taken
//     in keep-policy order (the best first; ties to the first seen); each
//     one not yet in a group becomes a keeper and takes, as its drops, every
//     document not yet in a group that it has a confirmed pair with. A
//     keeper that takes nobody is in no group (it is kept). The result is
//     deterministic and a document in no group is never dropped.
// Documents are named by their dense index 0..n-1 in the order they were
// read ("first seen" order).
//
// Pure functions over plain data; thread-safe.
#ifndef KINDRED_GROUPS_H_
#define KINDRED_GROUPS_H_

#include <cstdint>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/scored_pairs.h"  // ScoredPair

namespace kindred {

// How the keeper of a group is chosen. Ties always go to the document seen
// first, so the choice is deterministic.
enum class KeepPolicy : uint8_t {
  kFirst = 0,     // the document seen first
  kLongest = 1,   // the longest text (bytes)
  kPriority = 2,  // the highest priority value; documents without one rank lowest
};

// Parses "first", "longest", "priority".
absl::StatusOr<KeepPolicy> ParseKeepPolicy(std::string_view name);
const char* KeepPolicyName(KeepPolicy policy);

// How confirmed pairs make groups (see the top of this file).
enum class Grouping : uint8_t {
  kComponents = 0,
  kKeepers = 1,
};

// Parses "components", "keepers".
absl::StatusOr<Grouping> ParseGrouping(std::string_view name);
const char* GroupingName(Grouping grouping);

// What the keep policies look at, per document.
struct KeepFacts {
  uint64_t length = 0;  // text length in bytes
  double priority = 0;
  bool has_priority = false;
  friend bool operator==(const KeepFacts&, const KeepFacts&) = default;
};

struct Group {
  uint32_t keeper = 0;
  std::vector<uint32_t> members;  // ascending, keeper included
};

// Groups `pairs` over documents 0..facts.size()-1. Returns the groups of two
// or more members, ordered by their smallest member; members ascending.
// Works on up to `threads` threads (the caller's among them); the groups
// are the same for any count.
std::vector<Group> GroupPairs(absl::Span<const ScoredPair> pairs, absl::Span<const KeepFacts> facts,
                              KeepPolicy policy, Grouping grouping = Grouping::kComponents,
                              int threads = 1);

}  // namespace kindred

#endif  // KINDRED_GROUPS_H_
