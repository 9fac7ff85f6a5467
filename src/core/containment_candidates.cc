// Containment candidates: the band keys of each distinct banding of the plan
// (LSH Ensemble, Zhu et al., VLDB 2016; see containment_lsh.h), computed from
// the documents' one signature, and the pairs of the partitions that use it.
#include "kindred/containment_candidates.h"

#include <algorithm>
#include <map>
#include <utility>

#include "core/band_spill.h"
#include "core/contract_internal.h"
#include "core/parallel.h"

namespace kindred {
namespace {

// Which pairs of partitions (small <= large) one banding serves.
class PartitionPairs {
 public:
  explicit PartitionPairs(size_t partitions)
      : partitions_(partitions), allowed_(partitions * partitions, 0), involved_(partitions, 0) {}
  void Allow(uint32_t small, uint32_t large) {
    allowed_[small * partitions_ + large] = 1;
    involved_[small] = involved_[large] = 1;
  }
  bool Allowed(int a, int b) const {
    return allowed_[std::min(a, b) * partitions_ + std::max(a, b)] != 0;
  }
  bool Involved(int partition) const { return partition >= 0 && involved_[partition] != 0; }

 private:
  size_t partitions_;
  std::vector<uint8_t> allowed_;
  std::vector<uint8_t> involved_;
};

struct BandTally {
  uint64_t entries = 0;
  uint64_t largest = 0;
  uint64_t oversized = 0;
};

// The pairs of one bucket (documents ascending) that the banding serves; a
// bucket over max_bucket pairs each member with its first only.
void PairBucket(absl::Span<const BucketEntry> bucket, const std::vector<int>& partition,
                const PartitionPairs& serves, uint64_t max_bucket, std::vector<PackedPair>* out,
                BandTally* tally) {
  tally->largest = std::max<uint64_t>(tally->largest, bucket.size());
  if (bucket.size() > max_bucket) {
    ++tally->oversized;
    const uint32_t first = bucket[0].doc;
    for (size_t y = 1; y < bucket.size(); ++y) {
      if (serves.Allowed(partition[first], partition[bucket[y].doc])) {
        out->push_back(PackPair(first, bucket[y].doc));
      }
    }
    return;
  }
  for (size_t x = 0; x < bucket.size(); ++x) {
    const int px = partition[bucket[x].doc];
    for (size_t y = x + 1; y < bucket.size(); ++y) {
      if (serves.Allowed(px, partition[bucket[y].doc])) {
        out->push_back(PackPair(bucket[x].doc, bucket[y].doc));
      }
    }
  }
}

// The candidate pairs of one banding over the documents `docs` (ascending).
std::vector<PackedPair> SearchBanding(const SignedCorpus& corpus, Banding banding,
                                      const std::vector<uint32_t>& docs,
                                      const std::vector<int>& partition,
                                      const PartitionPairs& serves, int threads,
                                      uint64_t max_bucket, ContainmentCandidateStats* stats) {
  const size_t m = docs.size();
  const uint32_t bands = banding.bands;
  std::vector<uint64_t> keys(m * bands);  // band-major: keys[band * m + i]
  ParallelFor(m, threads, [&](size_t begin, size_t end, int) {
    std::vector<uint64_t> one(bands);
    for (size_t i = begin; i < end; ++i) {
      BandKeys(corpus.signature(docs[i]), banding, absl::MakeSpan(one));
      for (uint32_t band = 0; band < bands; ++band) keys[band * m + i] = one[band];
    }
  });
  std::vector<std::vector<PackedPair>> band_pairs(bands);
  std::vector<BandTally> tallies(bands);
  struct Space {
    EntryVector entries, scratch;
    HugePageVector<uint32_t> offsets;
  };
  std::vector<Space> spaces(std::max(1, threads));
  ParallelFor(bands, threads, [&](size_t begin, size_t end, int worker) {
    Space& space = spaces[worker];
    for (size_t band = begin; band < end; ++band) {
      space.entries.clear();
      for (size_t i = 0; i < m; ++i) {
        const uint64_t key = keys[band * m + i];
        if (key != kNoBandKey) space.entries.push_back({key, docs[i]});
      }
      tallies[band].entries = space.entries.size();
      SortEntries(space.entries, space.scratch, space.offsets);
      const auto all = absl::MakeConstSpan(space.entries);
      for (size_t start = 0; start < all.size();) {
        size_t stop = start + 1;
        while (stop < all.size() && all[stop].key == all[start].key) ++stop;
        if (stop - start > 1) {
          PairBucket(all.subspan(start, stop - start), partition, serves, max_bucket,
                     &band_pairs[band], &tallies[band]);
        } else {
          tallies[band].largest = std::max<uint64_t>(tallies[band].largest, 1);
        }
        start = stop;
      }
      std::sort(band_pairs[band].begin(), band_pairs[band].end());
      band_pairs[band].erase(std::unique(band_pairs[band].begin(), band_pairs[band].end()),
                             band_pairs[band].end());
    }
  });
  std::vector<PackedPair> pairs;
  for (uint32_t band = 0; band < bands; ++band) {
    stats->bucket_entries += tallies[band].entries;
    stats->largest_bucket = std::max(stats->largest_bucket, tallies[band].largest);
    stats->oversized_buckets += tallies[band].oversized;
    pairs.insert(pairs.end(), band_pairs[band].begin(), band_pairs[band].end());
    std::vector<PackedPair>().swap(band_pairs[band]);
  }
  return pairs;
}

// Orders bandings for a deterministic search order.
struct BandingLess {
  bool operator()(const Banding& a, const Banding& b) const {
    return std::pair(a.rows, a.bands) < std::pair(b.rows, b.bands);
  }
};

}  // namespace

std::vector<PackedPair> FindContainmentCandidates(const SignedCorpus& corpus,
                                                  const ContainmentPlan& plan, int threads,
                                                  ContainmentCandidateStats* stats,
                                                  uint64_t max_bucket) {
  internal::RequireContract(
      !corpus.lean() && plan.options().perms == corpus.perms() && max_bucket >= 2,
      "FindContainmentCandidates needs a whole corpus of the plan's perms");
  const size_t n = corpus.size();
  std::vector<int> partition(n);
  for (size_t doc = 0; doc < n; ++doc) {
    const uint32_t size = corpus.shingle_count(doc);
    partition[doc] = size == 0 ? -1 : plan.PartitionOf(size);
    if (size > 0 && partition[doc] < 0) ++stats->below_min_size;
  }
  std::map<Banding, PartitionPairs, BandingLess> bandings;
  for (const PartitionBanding& pair : plan.pairs()) {
    auto it = bandings.try_emplace(pair.banding, plan.partitions().size()).first;
    it->second.Allow(pair.small, pair.large);
  }
  std::vector<PackedPair> pairs;
  for (const auto& [banding, serves] : bandings) {
    std::vector<uint32_t> docs;
    for (size_t doc = 0; doc < n; ++doc) {
      if (serves.Involved(partition[doc])) docs.push_back(static_cast<uint32_t>(doc));
    }
    if (docs.size() < 2) continue;
    ++stats->bandings;
    std::vector<PackedPair> found =
        SearchBanding(corpus, banding, docs, partition, serves, threads, max_bucket, stats);
    pairs.insert(pairs.end(), found.begin(), found.end());
  }
  std::sort(pairs.begin(), pairs.end());
  pairs.erase(std::unique(pairs.begin(), pairs.end()), pairs.end());
  stats->candidate_pairs = pairs.size();
  return pairs;
}

ContainmentPlan PlanForCorpus(const SignedCorpus& corpus, ContainmentPlanOptions options) {
  internal::RequireContract(!corpus.lean(), "PlanForCorpus needs a whole corpus");
  uint32_t largest = options.min_size;
  for (size_t doc = 0; doc < corpus.size(); ++doc) {
    largest = std::max(largest, corpus.shingle_count(doc));
  }
  options.largest_size = largest;
  return ContainmentPlan(options);
}

}  // namespace kindred
