// kindred: the verifier: exact measures of pairs on their shingle sets.
//
// Every pair kindred reports is confirmed here, on the full sets of 64-bit
// shingle hashes, never on signatures alone. Sets are sorted ascending and hold
// no repeats (the ShingleSet contract of shingles.h). Every measure is a
// ScoredPair (scored_pairs.h), the one pair type of the library.
//
// The measuring functions are pure functions over borrowed spans; the
// verification of many pairs (VerifyPairs, ExhaustivePairs) reads a signed
// corpus and uses `threads` worker threads inside, with the same result for
// any thread count. All are thread-safe.
#ifndef KINDRED_VERIFY_H_
#define KINDRED_VERIFY_H_

#include <cstdint>
#include <vector>

#include "absl/types/span.h"
#include "kindred/candidate_pairs.h"
#include "kindred/scored_pairs.h"
#include "kindred/settings.h"
#include "kindred/signed_corpus.h"

namespace kindred {

// |A n B| / |A u B| from the counts; 0 when both sets are empty.
double JaccardOf(uint32_t shared, uint32_t size_a, uint32_t size_b);

// The value of `measure` for `pair`: its Jaccard similarity, or its
// Containment() (the larger of the two containments).
double MeasureOf(const ScoredPair& pair, Measure measure);

// Counts the shared hashes of two sorted, repeat-free sets. Linear merge for
// sets of similar size, galloping search when one is much smaller. Fills
// shared, size_a, size_b and jaccard; a, b and estimate are left 0 for the
// caller.
ScoredPair MeasureOverlap(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b);

// Like MeasureOverlap, but gives up (returns false, *out partly filled) as
// soon as fewer than `needed` shared hashes remain possible: the shared
// count so far plus what is left of the shorter remainder. This is the
// overlap bound of prefix filtering (Chaudhuri, Ganti, Kaushik 2006, "A
// Primitive Operator for Similarity Joins in Data Cleaning"; Xiao, Wang,
// Lin, Yu 2008, "Efficient Similarity Joins for Near Duplicate Detection",
// PPJoin): a pair that cannot reach the threshold stops early. Returns true
// with the exact overlap otherwise.
bool MeasureOverlapAtLeast(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b,
                           uint32_t needed, ScoredPair* out);

// True when the counts pass `match` (measure >= threshold, compared exactly
// on the counts, with a 1e-9 allowance for the decimal threshold; for
// containment, the smaller set also has at least match.min_contained_size
// shingles).
bool PassesThreshold(uint32_t shared, uint32_t size_a, uint32_t size_b, const MatchSettings& match);
inline bool PassesThreshold(const ScoredPair& pair, const MatchSettings& match) {
  return PassesThreshold(pair.shared, pair.size_a, pair.size_b, match);
}

// Confirms each candidate pair on the shingle sets of `corpus` (those of
// each document's representative when the corpus groups identical sets);
// returns the pairs that pass, in the order of `candidates` (ascending),
// with exact and estimated similarity.
std::vector<ScoredPair> VerifyPairs(const SignedCorpus& corpus,
                                    absl::Span<const PackedPair> candidates,
                                    const MatchSettings& match, int threads);

// The reference: every pair compared exactly, no LSH. Quadratic; for small
// corpora and for measuring LSH recall.
std::vector<ScoredPair> ExhaustivePairs(const SignedCorpus& corpus, const MatchSettings& match,
                                        int threads);

}  // namespace kindred

#endif  // KINDRED_VERIFY_H_
