// kindred: candidate pairs from LSH banding.
//
// Each document's signature is cut into `bands` bands of `rows` slots; two
// documents become a candidate pair when any band of theirs hashes to the same
// bucket (band key). A pair of similarity s becomes a candidate with
// probability 1-(1-s^r)^b (see banding.h). Empty documents have no band keys
// and are never candidates.
//
// Pure function of its input; thread count does not change the result.
#ifndef KINDRED_CANDIDATES_H_
#define KINDRED_CANDIDATES_H_

#include <cstdint>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/banding.h"
#include "kindred/candidate_pairs.h"  // PackedPair, CandidateStats
#include "kindred/signed_corpus.h"

namespace kindred {

// Buckets hold the documents that agree on a whole band. A bucket of s
// documents proposes s(s-1)/2 pairs, so a band shared by thousands of
// documents (a common boilerplate block, a template) would make this stage
// quadratic. Buckets of more than `max_bucket` documents are therefore
// handled deliberately: each member is paired with the bucket's first
// document only (its representative), which keeps exact and near-exact
// copies of a template together through the grouping, costs s - 1 pairs,
// and is counted in CandidateStats::oversized_buckets so the summary can say
// so. Pairs of two non-representative members can then only come from their
// other bands. The default cap is far above what real near-duplicate
// clusters reach.
inline constexpr uint64_t kDefaultMaxBucket = 5000;

// The distinct candidate pairs of `corpus` under `banding`, ascending.
// Requires banding.bands * banding.rows <= corpus.perms() and max_bucket >= 2;
// for a lean corpus, banding == corpus.lean_banding() and no spill (see
// FindSpilledCandidatePairs).
std::vector<PackedPair> FindCandidatePairs(const SignedCorpus& corpus, Banding banding, int threads,
                                           CandidateStats* stats,
                                           uint64_t max_bucket = kDefaultMaxBucket);

// The same for any corpus, including a lean one whose band keys were partly
// spilled to disk (SignedCorpus::spill()): each band is then a merge of its
// sorted runs and the keys in memory, and the result is identical to an
// all-in-memory search. Errors: Aborted when the spill file cannot be read.
absl::StatusOr<std::vector<PackedPair>> FindSpilledCandidatePairs(
    const SignedCorpus& corpus, Banding banding, int threads, CandidateStats* stats,
    uint64_t max_bucket = kDefaultMaxBucket);

// For a corpus that groups identical sets (SignedCorpus::GroupIdenticalSets):
// the candidate pairs a search over every document would give (same pairs,
// same stats; each group is a document of its group's weight). Unless a
// bucket holds more than max_bucket documents, `pairs` are pairs of
// representatives: the document pairs are every member pair of each, and
// every two members of one non-empty group. Otherwise (`expanded`) `pairs`
// are the document pairs themselves. Errors: as FindSpilledCandidatePairs.
struct GroupedCandidates {
  std::vector<PackedPair> pairs;  // ascending
  bool expanded = false;
};
absl::StatusOr<GroupedCandidates> FindGroupedCandidatePairs(
    const SignedCorpus& corpus, Banding banding, int threads, CandidateStats* stats,
    uint64_t max_bucket = kDefaultMaxBucket);

}  // namespace kindred

#endif  // KINDRED_CANDIDATES_H_
