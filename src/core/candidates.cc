#include "kindred/candidates.h"

#include <algorithm>
#include <bit>

#include "core/contract_internal.h"
#include "kindred/band_spill.h"
#include "kindred/parallel.h"

namespace kindred {
namespace {

struct BandStats {
  uint64_t entries = 0;
  uint64_t largest = 0;
  uint64_t oversized = 0;
};

// Turns one band's entries, given in (key, doc) order, into pairs: every two
// documents that share a bucket, or for a bucket of more than max_bucket
// documents each member with the first. Holds at most max_bucket entries.
class BucketPairer {
 public:
  BucketPairer(uint64_t max_bucket, std::vector<PackedPair>* pairs, BandStats* stats)
      : max_bucket_(max_bucket), pairs_(pairs), stats_(stats) {}

  void Push(const BucketEntry& entry) {
    ++stats_->entries;
    if (size_ > 0 && entry.key != key_) Finish();
    if (size_ == 0) key_ = entry.key;
    ++size_;
    if (oversized_) {
      pairs_->push_back(PackPair(first_, entry.doc));
      return;
    }
    members_.push_back(entry.doc);
    if (size_ > max_bucket_) {  // now known to be crowded: pair with the first only
      oversized_ = true;
      first_ = members_[0];
      for (size_t y = 1; y < members_.size(); ++y) pairs_->push_back(PackPair(first_, members_[y]));
      members_.clear();
    }
  }

  // Ends the current bucket; call once after the last entry too.
  void Finish() {
    stats_->largest = std::max(stats_->largest, size_);
    if (oversized_) {
      stats_->oversized++;
    } else {
      for (size_t x = 0; x < members_.size(); ++x) {
        for (size_t y = x + 1; y < members_.size(); ++y) {
          pairs_->push_back(PackPair(members_[x], members_[y]));
        }
      }
    }
    members_.clear();
    size_ = 0;
    oversized_ = false;
  }

 private:
  const uint64_t max_bucket_;
  std::vector<PackedPair>* pairs_;
  BandStats* stats_;
  uint64_t key_ = 0;
  uint64_t size_ = 0;
  bool oversized_ = false;
  uint32_t first_ = 0;
  std::vector<uint32_t> members_;
};

// The entries of one band column (documents first, first + 1, ...; keys
// kNoBandKey skipped) whose key may occur more than once, in document
// order: a key is kept when another key of the column has the same top bits
// (log2(16 n) bits of a well-spread hash: a false match for about one entry
// in 16), so every bucket of two or more survives whole. Most band keys are
// unique, and sorting the few left is far cheaper than sorting all of them;
// the column is read twice instead of copied whole. With drop_singletons
// false (or fewer than 1024 keys) every entry is kept. Returns the number of
// entries dropped (buckets of one).
size_t CollectEntries(const uint64_t* column, size_t count, size_t first, bool drop_singletons,
                      HugePageVector<uint64_t>& filter, EntryVector& entries) {
  entries.clear();
  const auto collect = [&](auto keep) {
    size_t valid = 0;
    for (size_t i = 0; i < count; ++i) {
      if (column[i] == kNoBandKey) continue;
      ++valid;
      if (keep(column[i])) entries.push_back({column[i], static_cast<uint32_t>(first + i)});
    }
    return valid - entries.size();
  };
  if (!drop_singletons || count < 1024) {
    entries.reserve(count);
    return collect([](uint64_t) { return true; });
  }
  const int bits = static_cast<int>(std::bit_width(count * 16 - 1));
  const size_t words = (size_t{1} << bits) / 64;
  filter.assign(2 * words, 0);
  uint64_t* once = filter.data();
  uint64_t* twice = filter.data() + words;
  const int shift = 64 - bits;
  for (size_t i = 0; i < count; ++i) {
    if (column[i] == kNoBandKey) continue;
    const uint64_t slot = column[i] >> shift;
    const uint64_t bit = uint64_t{1} << (slot & 63);
    twice[slot >> 6] |= once[slot >> 6] & bit;
    once[slot >> 6] |= bit;
  }
  return collect([&](uint64_t key) {
    const uint64_t slot = key >> shift;
    return ((twice[slot >> 6] >> (slot & 63)) & 1) != 0;
  });
}

}  // namespace

absl::StatusOr<std::vector<PackedPair>> FindSpilledCandidatePairs(const SignedCorpus& corpus,
                                                                  Banding banding, int threads,
                                                                  CandidateStats* stats,
                                                                  uint64_t max_bucket) {
  const size_t n = corpus.size();
  const uint32_t bands = banding.bands;
  // The band keys of the documents held in memory, band by band: a lean
  // corpus keeps them (from first_resident() on; the others are in its
  // spill), otherwise they are computed here into `computed` (band * n +
  // doc). Documents with no shingles have no keys (all kNoBandKey).
  const size_t first = corpus.lean() ? corpus.first_resident() : 0;
  const size_t resident = n - first;
  std::vector<const uint64_t*> columns(bands);
  std::vector<uint64_t> computed;
  if (corpus.lean()) {
    for (uint32_t band = 0; band < bands; ++band) columns[band] = corpus.band_column(band).data();
  } else {
    computed.resize(n * bands);
    ParallelFor(n, threads, [&](size_t begin, size_t end, int) {
      std::vector<uint64_t> keys(bands);
      for (size_t doc = begin; doc < end; ++doc) {
        if (corpus.shingle_count(doc) == 0) {
          std::fill(keys.begin(), keys.end(), kNoBandKey);
        } else {
          BandKeys(corpus.signature(doc), banding, absl::MakeSpan(keys));
        }
        for (uint32_t band = 0; band < bands; ++band) computed[band * n + doc] = keys[band];
      }
    });
    for (uint32_t band = 0; band < bands; ++band) columns[band] = computed.data() + band * n;
  }
  const BandSpill* spill = corpus.spill();
  std::vector<std::vector<PackedPair>> band_pairs(bands);
  std::vector<BandStats> band_stats(bands);
  std::vector<absl::Status> band_status(bands);
  // Working space per worker, kept from band to band, in huge pages (fresh
  // small pages for every band cost a page fault per 4 KiB).
  struct Space {
    EntryVector entries, scratch;
    HugePageVector<uint32_t> offsets;
    HugePageVector<uint64_t> filter;
  };
  std::vector<Space> spaces(std::max(1, threads));
  // Without spilled runs, buckets of one make no pairs: they are counted,
  // not collected and sorted.
  const bool in_memory = spill == nullptr || spill->runs() == 0;
  ParallelFor(bands, threads, [&](size_t begin, size_t end, int worker) {
    EntryVector& entries = spaces[worker].entries;
    EntryVector& scratch = spaces[worker].scratch;
    HugePageVector<uint32_t>& offsets = spaces[worker].offsets;
    for (size_t band = begin; band < end; ++band) {
      const size_t dropped =
          CollectEntries(columns[band], resident, first, in_memory, spaces[worker].filter, entries);
      BucketPairer pairer(max_bucket, &band_pairs[band], &band_stats[band]);
      if (in_memory) {
        band_stats[band].entries += dropped;
        if (dropped > 0) band_stats[band].largest = std::max<uint64_t>(band_stats[band].largest, 1);
        SortEntries(entries, scratch, offsets);
        for (const BucketEntry& entry : entries) pairer.Push(entry);
      } else {
        SortEntries(entries, scratch, offsets);
        BandMerger merger(*spill, static_cast<uint32_t>(band), entries);
        BucketEntry entry;
        for (;;) {
          absl::StatusOr<bool> more = merger.Next(&entry);
          if (!more.ok()) {
            band_status[band] = more.status();
            break;
          }
          if (!*more) break;
          pairer.Push(entry);
        }
      }
      pairer.Finish();
      std::sort(band_pairs[band].begin(), band_pairs[band].end());
    }
  });
  for (const absl::Status& status : band_status) {
    if (!status.ok()) return status;
  }
  std::vector<PackedPair> pairs;
  for (uint32_t band = 0; band < bands; ++band) {
    stats->bucket_entries += band_stats[band].entries;
    stats->largest_bucket = std::max(stats->largest_bucket, band_stats[band].largest);
    stats->oversized_buckets += band_stats[band].oversized;
    pairs.insert(pairs.end(), band_pairs[band].begin(), band_pairs[band].end());
    std::vector<PackedPair>().swap(band_pairs[band]);
  }
  std::sort(pairs.begin(), pairs.end());
  pairs.erase(std::unique(pairs.begin(), pairs.end()), pairs.end());
  stats->candidate_pairs = pairs.size();
  return pairs;
}

std::vector<PackedPair> FindCandidatePairs(const SignedCorpus& corpus, Banding banding, int threads,
                                           CandidateStats* stats, uint64_t max_bucket) {
  internal::RequireContract(corpus.spill() == nullptr || corpus.spill()->runs() == 0,
                            "FindCandidatePairs needs a corpus without spilled band keys");
  absl::StatusOr<std::vector<PackedPair>> pairs =
      FindSpilledCandidatePairs(corpus, banding, threads, stats, max_bucket);
  internal::RequireContract(pairs.ok(), "candidate search in memory cannot fail");
  return *std::move(pairs);
}

}  // namespace kindred
