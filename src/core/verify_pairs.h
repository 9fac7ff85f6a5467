// Verification of candidate pairs over any holder of sets: the one loop
// behind VerifyPairs (a signed corpus) and VerifyCandidates (a set store).
#ifndef KINDRED_CORE_VERIFY_PAIRS_H_
#define KINDRED_CORE_VERIFY_PAIRS_H_

#include <algorithm>
#include <cstdint>
#include <vector>

#include "absl/types/span.h"
#include "kindred/candidate_pairs.h"
#include "core/parallel.h"
#include "kindred/scored_pairs.h"
#include "kindred/settings.h"
#include "kindred/signer.h"
#include "kindred/verify.h"

namespace kindred::internal {

// A lower bound on the shared count a pair of sets of these sizes needs to
// pass `match` (one below the exact need, so that rounding never stops a
// pair that passes): for Jaccard, shared >= t (|A| + |B|) / (1 + t).
uint32_t NeededShared(size_t size_a, size_t size_b, const MatchSettings& match);

// Concatenates per-chunk results in chunk order.
template <typename T>
std::vector<T> Concatenate(std::vector<std::vector<T>>& parts) {
  std::vector<T> all;
  size_t total = 0;
  for (const auto& part : parts) total += part.size();
  all.reserve(total);
  for (auto& part : parts) {
    all.insert(all.end(), part.begin(), part.end());
    std::vector<T>().swap(part);
  }
  return all;
}

// The pair (a, b) scored from its measured overlap and the two signatures.
inline ScoredPair Score(uint32_t a, uint32_t b, ScoredPair overlap,
                        absl::Span<const uint32_t> signature_a,
                        absl::Span<const uint32_t> signature_b) {
  overlap.a = a;
  overlap.b = b;
  overlap.estimate = EstimateJaccard(signature_a, signature_b);
  return overlap;
}

// The candidates that pass `match`, in the order of `candidates`. `sets`
// gives shingles(doc) and signature(doc) for every document of a pair.
template <typename Sets>
std::vector<ScoredPair> VerifyWith(absl::Span<const PackedPair> candidates, const Sets& sets,
                                   const MatchSettings& match, int threads) {
  // Chunks of at most 16384 pairs, at least eight per thread when there
  // are enough pairs (one large chunk per thread left the last one alone);
  // the output is the same for any chunking.
  const size_t per_chunk = std::clamp<size_t>(
      candidates.size() / (8 * static_cast<size_t>(std::max(1, threads))), 256, size_t{1} << 14);
  const size_t chunks = (candidates.size() + per_chunk - 1) / per_chunk;
  std::vector<std::vector<ScoredPair>> parts(chunks);
  ParallelFor(chunks, threads, [&](size_t begin, size_t end, int) {
    for (size_t chunk = begin; chunk < end; ++chunk) {
      const size_t stop = std::min(candidates.size(), (chunk + 1) * per_chunk);
      for (size_t i = chunk * per_chunk; i < stop; ++i) {
        const uint32_t a = PairFirst(candidates[i]);
        const uint32_t b = PairSecond(candidates[i]);
        const absl::Span<const uint64_t> set_a = sets.shingles(a);
        const absl::Span<const uint64_t> set_b = sets.shingles(b);
        ScoredPair overlap;
        if (!MeasureOverlapAtLeast(set_a, set_b, NeededShared(set_a.size(), set_b.size(), match),
                                   &overlap)) {
          continue;
        }
        if (PassesThreshold(overlap, match)) {
          parts[chunk].push_back(Score(a, b, overlap, sets.signature(a), sets.signature(b)));
        }
      }
    }
  });
  return Concatenate(parts);
}

}  // namespace kindred::internal

#endif  // KINDRED_CORE_VERIFY_PAIRS_H_
