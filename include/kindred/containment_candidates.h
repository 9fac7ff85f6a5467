// kindred: candidate pairs for containment, by the plan of containment_lsh.h.
//
// A document of s shingles belongs to size partition PartitionOf(s) of the
// plan. A pair whose smaller document is in partition i and larger in j is
// proposed when the two agree on all rows of one band of PairOf(i, j)'s
// banding, computed from their ordinary MinHash signatures; so a pair of
// containment c and sizes q <= x is proposed with probability
// ContainmentCandidateProbability(c, q, x, that banding). Documents below the
// plan's min_size (and empty ones) take part in no pair.
//
// Crowded buckets are capped as in candidates.h: a bucket of more than
// max_bucket documents pairs each member with its first document only.
//
// Pure function of its input; thread count does not change the result.
#ifndef KINDRED_CONTAINMENT_CANDIDATES_H_
#define KINDRED_CONTAINMENT_CANDIDATES_H_

#include <cstdint>
#include <vector>

#include "kindred/candidates.h"
#include "kindred/containment_lsh.h"
#include "kindred/signed_corpus.h"

namespace kindred {

struct ContainmentCandidateStats {
  uint64_t below_min_size = 0;     // non-empty documents under the plan's min_size
  uint64_t bandings = 0;           // distinct bandings searched
  uint64_t bucket_entries = 0;     // (band key, document) entries, over all bandings
  uint64_t largest_bucket = 0;     // documents in the most crowded bucket
  uint64_t oversized_buckets = 0;  // buckets over the cap
  uint64_t candidate_pairs = 0;    // distinct pairs
};

// The distinct candidate pairs of `corpus` under `plan`, ascending.
// Requires a corpus kept whole (not lean: signatures of every document),
// plan.options().perms == corpus.perms(), max_bucket >= 2. Memory: the band
// keys of the documents of one banding at a time (8 bytes per band each).
std::vector<PackedPair> FindContainmentCandidates(const SignedCorpus& corpus,
                                                  const ContainmentPlan& plan, int threads,
                                                  ContainmentCandidateStats* stats,
                                                  uint64_t max_bucket = kDefaultMaxBucket);

// The plan for `corpus`: options with largest_size set to its largest set
// (at least min_size). Requires a corpus kept whole.
ContainmentPlan PlanForCorpus(const SignedCorpus& corpus, ContainmentPlanOptions options);

}  // namespace kindred

#endif  // KINDRED_CONTAINMENT_CANDIDATES_H_
