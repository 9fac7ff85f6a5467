#include "kindred/verify.h"

#include <algorithm>

#include "core/parallel.h"
#include "core/verify_pairs.h"

namespace kindred {
namespace {

// Branch-light merge count of two sorted runs.
uint32_t MergeCount(const uint64_t* a, const uint64_t* a_end, const uint64_t* b,
                    const uint64_t* b_end) {
  uint32_t shared = 0;
  while (a != a_end && b != b_end) {
    const uint64_t x = *a;
    const uint64_t y = *b;
    shared += (x == y);
    a += (x <= y);
    b += (y <= x);
  }
  return shared;
}

// Merge count that stops once `needed` is out of reach: checked every 64
// steps, so the inner loop stays branch-light. Returns false when stopped.
bool BoundedMergeCount(const uint64_t* a, const uint64_t* a_end, const uint64_t* b,
                       const uint64_t* b_end, uint32_t needed, uint32_t* shared_out) {
  uint32_t shared = 0;
  for (;;) {
    const size_t left = static_cast<size_t>(std::min(a_end - a, b_end - b));
    if (shared + left < needed) return false;
    if (left < 64) break;
    for (int step = 0; step < 64; ++step) {  // a and b each advance at most 64
      const uint64_t x = *a;
      const uint64_t y = *b;
      shared += (x == y);
      a += (x <= y);
      b += (y <= x);
    }
  }
  *shared_out = shared + MergeCount(a, a_end, b, b_end);
  return *shared_out >= needed;
}

// For each element of the small set, gallops forward in the large one: an
// exponential search then a binary search (Bentley and Yao 1976, "An
// almost optimal algorithm for unbounded searching"; its use for
// intersecting sorted sets: Demaine, Lopez-Ortiz, Munro 2000, "Adaptive set
// intersections, unions, and differences"; Baeza-Yates 2004, "A fast set
// intersection algorithm for sorted sequences"). Costs about
// |small| log(|large| / |small|) comparisons instead of |small| + |large|.
// Stops (returns what it has counted) once fewer than `needed` remain
// possible.
uint32_t GallopCount(absl::Span<const uint64_t> small, absl::Span<const uint64_t> large,
                     uint32_t needed = 0) {
  uint32_t shared = 0;
  const uint64_t* base = large.data();
  const uint64_t* end = large.data() + large.size();
  size_t left = small.size();
  for (uint64_t x : small) {
    if (shared + left < needed) break;
    --left;
    size_t step = 1;
    const uint64_t* probe = base;
    while (probe + step < end && probe[step] < x) {
      probe += step;
      step <<= 1;
    }
    const uint64_t* limit = std::min(end, probe + step + 1);
    base = std::lower_bound(probe, limit, x);
    if (base == end) break;
    if (*base == x) {
      ++shared;
      ++base;
    }
  }
  return shared;
}

}  // namespace

double JaccardOf(uint32_t shared, uint32_t size_a, uint32_t size_b) {
  const uint64_t uni = uint64_t{size_a} + size_b - shared;
  return uni == 0 ? 0.0 : static_cast<double>(shared) / static_cast<double>(uni);
}

double MeasureOf(const ScoredPair& pair, Measure measure) {
  return measure == Measure::kJaccard ? pair.jaccard : pair.Containment();
}

namespace {

// The shared count of two sets (MeasureOverlap without the Jaccard).
uint32_t CountShared(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b) {
  if (a.empty() || b.empty()) return 0;
  // Disjoint ranges share nothing.
  if (a.back() < b.front() || b.back() < a.front()) return 0;
  if (a.size() * 16 < b.size()) return GallopCount(a, b);
  if (b.size() * 16 < a.size()) return GallopCount(b, a);
  return MergeCount(a.data(), a.data() + a.size(), b.data(), b.data() + b.size());
}

}  // namespace

ScoredPair MeasureOverlap(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b) {
  ScoredPair pair;
  pair.size_a = static_cast<uint32_t>(a.size());
  pair.size_b = static_cast<uint32_t>(b.size());
  pair.shared = CountShared(a, b);
  pair.jaccard = JaccardOf(pair.shared, pair.size_a, pair.size_b);
  return pair;
}

bool MeasureOverlapAtLeast(absl::Span<const uint64_t> a, absl::Span<const uint64_t> b,
                           uint32_t needed, ScoredPair* out) {
  *out = ScoredPair{};
  out->size_a = static_cast<uint32_t>(a.size());
  out->size_b = static_cast<uint32_t>(b.size());
  if (needed == 0) {
    *out = MeasureOverlap(a, b);
    return true;
  }
  if (a.empty() || b.empty() || a.back() < b.front() || b.back() < a.front()) return false;
  bool reached;
  if (a.size() * 16 < b.size() || b.size() * 16 < a.size()) {
    const bool a_small = a.size() < b.size();
    out->shared = a_small ? GallopCount(a, b, needed) : GallopCount(b, a, needed);
    reached = out->shared >= needed;
  } else {
    reached = BoundedMergeCount(a.data(), a.data() + a.size(), b.data(), b.data() + b.size(),
                                needed, &out->shared);
  }
  if (reached) out->jaccard = JaccardOf(out->shared, out->size_a, out->size_b);
  return reached;
}

bool PassesThreshold(uint32_t shared, uint32_t size_a, uint32_t size_b,
                     const MatchSettings& match) {
  if (shared == 0) return false;
  if (match.measure == Measure::kContainment &&
      std::min(size_a, size_b) < match.min_contained_size) {
    return false;
  }
  const double denominator = match.measure == Measure::kJaccard
                                 ? static_cast<double>(size_a) + size_b - shared
                                 : static_cast<double>(std::min(size_a, size_b));
  return shared >= match.threshold * denominator - 1e-9;
}

namespace internal {

uint32_t NeededShared(size_t size_a, size_t size_b, const MatchSettings& match) {
  const double t = match.threshold;
  const double exact = match.measure == Measure::kJaccard
                           ? t * static_cast<double>(size_a + size_b) / (1 + t)
                           : t * static_cast<double>(std::min(size_a, size_b));
  return exact > 1 ? static_cast<uint32_t>(exact) - 1 : 0;
}

}  // namespace internal

namespace {

// The sets and signatures of a corpus's documents for verification: those
// of their representatives (the documents themselves unless the corpus
// groups identical sets).
struct RepresentativeSets {
  const SignedCorpus& corpus;
  absl::Span<const uint64_t> shingles(uint32_t doc) const {
    return corpus.shingles(corpus.representative(doc));
  }
  absl::Span<const uint32_t> signature(uint32_t doc) const {
    return corpus.signature(corpus.representative(doc));
  }
};

}  // namespace

std::vector<ScoredPair> VerifyPairs(const SignedCorpus& corpus,
                                    absl::Span<const PackedPair> candidates,
                                    const MatchSettings& match, int threads) {
  return internal::VerifyWith(candidates, RepresentativeSets{corpus}, match, threads);
}

std::vector<ScoredPair> ExhaustivePairs(const SignedCorpus& corpus, const MatchSettings& match,
                                        int threads) {
  const size_t n = corpus.size();
  std::vector<std::vector<ScoredPair>> parts(n);
  ParallelFor(n, threads, [&](size_t begin, size_t end, int) {
    for (size_t a = begin; a < end; ++a) {
      const auto set_a = corpus.shingles(a);
      for (size_t b = a + 1; b < n; ++b) {
        const auto set_b = corpus.shingles(b);
        // Exact pruning for Jaccard: J <= min/max of the set sizes.
        if (match.measure == Measure::kJaccard &&
            std::min(set_a.size(), set_b.size()) <
                match.threshold * std::max(set_a.size(), set_b.size()) - 1e-9) {
          continue;
        }
        if (match.measure == Measure::kContainment &&
            std::min(set_a.size(), set_b.size()) < match.min_contained_size) {
          continue;
        }
        const ScoredPair overlap = MeasureOverlap(set_a, set_b);
        if (PassesThreshold(overlap, match)) {
          parts[a].push_back(
              internal::Score(a, b, overlap, corpus.signature(a), corpus.signature(b)));
        }
      }
    }
  });
  return internal::Concatenate(parts);
}

}  // namespace kindred
