// The members of each group of identical sets of a SignedCorpus that groups
// them (SignedCorpus::GroupIdenticalSets), by representative.
#ifndef KINDRED_CORE_GROUP_MEMBERS_H_
#define KINDRED_CORE_GROUP_MEMBERS_H_

#include <cstdint>
#include <vector>

#include "absl/types/span.h"
#include "kindred/groups.h"
#include "kindred/settings.h"
#include "kindred/signed_corpus.h"

namespace kindred {

struct GroupMembers {
  explicit GroupMembers(const SignedCorpus& corpus) : offsets(corpus.size() + 1, 0) {
    for (size_t doc = 0; doc < corpus.size(); ++doc) ++offsets[corpus.representative(doc) + 1];
    for (size_t rep = 0; rep < corpus.size(); ++rep) offsets[rep + 1] += offsets[rep];
    members.resize(corpus.size());
    std::vector<uint32_t> next(offsets.begin(), offsets.end() - 1);
    for (size_t doc = 0; doc < corpus.size(); ++doc) {
      members[next[corpus.representative(doc)]++] = static_cast<uint32_t>(doc);
    }
  }
  // The members of the group `rep` represents, ascending (empty when `rep`
  // represents none).
  absl::Span<const uint32_t> of(uint32_t rep) const {
    return absl::MakeConstSpan(members.data() + offsets[rep], offsets[rep + 1] - offsets[rep]);
  }

  std::vector<uint32_t> offsets;  // members of rep r: [offsets[r], offsets[r + 1])
  std::vector<uint32_t> members;
};

// The document pairs of confirmed pairs of representatives `rep_pairs`
// (ascending): every member pair of each (scored as its representatives),
// and every two members of a non-empty group whose identical sets pass
// `match` (Jaccard 1, no intersection needed; the signature estimate of the
// representative with itself). Requires the signature of every such
// representative. Ascending (a, b): the pairs a search over every document
// confirms. Sorts on up to `threads` threads; the same for any count.
std::vector<ScoredPair> ExpandGroups(const SignedCorpus& corpus, const GroupMembers& groups,
                                     absl::Span<const ScoredPair> rep_pairs,
                                     const MatchSettings& match, int threads = 1);

// The representatives whose sets verification needs: those in
// `rep_pairs` (pairs of documents, or of representatives) and those of
// groups of two or more non-empty documents, without a set yet; ascending.
std::vector<uint32_t> RepresentativesToRead(const SignedCorpus& corpus,
                                            absl::Span<const uint64_t> pairs);

}  // namespace kindred

#endif  // KINDRED_CORE_GROUP_MEMBERS_H_
