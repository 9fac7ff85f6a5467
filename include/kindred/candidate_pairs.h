// kindred: candidate pairs, a record of the candidate stage.
//
// A candidate pair is two documents that share a bucket in some band (see
// candidates.h for the search, and the cap on crowded buckets). Pairs are
// packed as (a << 32 | b) with a < b, so sorting the packed values sorts by
// a, then b. A CandidatePairs record holds the distinct pairs of one search
// (of a whole corpus, or of one partition of its band keys), ascending, and
// the search's counts.
//
// The serialized form is documented in src/core/RECORDS.md. Plain data;
// thread-compatible.
#ifndef KINDRED_CANDIDATE_PAIRS_H_
#define KINDRED_CANDIDATE_PAIRS_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"

namespace kindred {

using PackedPair = uint64_t;
inline PackedPair PackPair(uint32_t a, uint32_t b) { return (uint64_t{a} << 32) | b; }
inline uint32_t PairFirst(PackedPair pair) { return static_cast<uint32_t>(pair >> 32); }
inline uint32_t PairSecond(PackedPair pair) { return static_cast<uint32_t>(pair); }

struct CandidateStats {
  uint64_t bucket_entries = 0;     // (band key, document) entries
  uint64_t largest_bucket = 0;     // documents in the most crowded bucket
  uint64_t oversized_buckets = 0;  // buckets over the cap (see candidates.h)
  uint64_t candidate_pairs = 0;    // distinct pairs
  friend bool operator==(const CandidateStats&, const CandidateStats&) = default;
};

struct CandidatePairs {
  std::vector<PackedPair> pairs;  // distinct, ascending
  CandidateStats stats;
  friend bool operator==(const CandidatePairs&, const CandidatePairs&) = default;
};

// The records of the partitions of one corpus merged: the distinct pairs of
// all, ascending; entries and oversized buckets summed, the largest bucket
// the largest of all, candidate_pairs the count of distinct pairs.
CandidatePairs MergeCandidatePairs(absl::Span<const CandidatePairs> parts);

// The documents of the pairs, ascending, each once: those whose shingle sets
// verification needs.
std::vector<uint32_t> CandidateDocuments(absl::Span<const PackedPair> pairs);

std::string SerializeCandidatePairs(const CandidatePairs& pairs);
// Errors: BadInput when `bytes` are not a whole, intact record, or its pairs
// are not distinct, ascending pairs with a < b.
absl::StatusOr<CandidatePairs> ParseCandidatePairs(std::string_view bytes);

}  // namespace kindred

#endif  // KINDRED_CANDIDATE_PAIRS_H_
