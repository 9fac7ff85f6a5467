#include "kindred/candidates.h"

#include <algorithm>
#include <bit>
#include <memory>

#include "core/band_spill.h"
#include "core/contract_internal.h"
#include "core/group_members.h"
#include "core/parallel.h"

namespace kindred {
namespace {

struct BandStats {
  uint64_t entries = 0;
  uint64_t largest = 0;
  uint64_t oversized = 0;
};

// How a search counts and pairs the documents of a corpus that groups
// identical sets (SignedCorpus::GroupIdenticalSets).
enum class Unit {
  kDocuments,        // every entry is one document (no grouping)
  kRepresentatives,  // an entry stands for its group: weighted, pairs of representatives
  kExpanded,         // an entry stands for its group: pairs of all members
};

// Turns one band's entries, given in (key, doc) order, into pairs: every two
// documents that share a bucket, or for a bucket of more than max_bucket
// documents each member with the first. Holds at most max_bucket entries
// (kDocuments). With groups of identical sets, an entry counts as its
// group's members: kRepresentatives pairs representatives and notes a
// bucket that is crowded by that count (the caller then searches again,
// kExpanded, which pairs the members themselves).
class BucketPairer {
 public:
  BucketPairer(uint64_t max_bucket, std::vector<PackedPair>* pairs, BandStats* stats,
               const SignedCorpus& corpus, Unit unit, const GroupMembers* groups)
      : max_bucket_(max_bucket),
        pairs_(pairs),
        stats_(stats),
        corpus_(corpus),
        unit_(unit),
        groups_(groups) {}

  void Push(const BucketEntry& entry) {
    if (unit_ == Unit::kDocuments) return PushDocument(entry);
    const uint64_t weight = corpus_.group_size(entry.doc);
    stats_->entries += weight;
    if (size_ > 0 && entry.key != key_) Finish();
    if (size_ == 0) key_ = entry.key;
    size_ += weight;
    if (unit_ == Unit::kExpanded) {
      const absl::Span<const uint32_t> members = groups_->of(entry.doc);
      members_.insert(members_.end(), members.begin(), members.end());
      return;
    }
    if (size_ > max_bucket_) crowded_ = true;
    if (!crowded_) members_.push_back(entry.doc);
  }

  // Ends the current bucket; call once after the last entry too.
  void Finish() {
    stats_->largest = std::max(stats_->largest, size_);
    if (unit_ == Unit::kExpanded) {
      std::sort(members_.begin(), members_.end());
      oversized_ = members_.size() > max_bucket_;
      if (oversized_) {
        for (size_t y = 1; y < members_.size(); ++y) {
          pairs_->push_back(PackPair(members_[0], members_[y]));
        }
        members_.clear();
      }
    }
    if (oversized_) {
      stats_->oversized++;
    } else if (!crowded_) {
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

  // kRepresentatives: whether a bucket held more than max_bucket documents.
  bool crowded() const { return crowded_; }

 private:
  void PushDocument(const BucketEntry& entry) {
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

  const uint64_t max_bucket_;
  std::vector<PackedPair>* pairs_;
  BandStats* stats_;
  const SignedCorpus& corpus_;
  const Unit unit_;
  const GroupMembers* groups_;
  uint64_t key_ = 0;
  uint64_t size_ = 0;
  bool oversized_ = false;
  bool crowded_ = false;
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
// false (or fewer than 1024 keys) every entry is kept. Returns what was
// dropped (buckets of one entry; an entry counts as the members of its group
// when the corpus groups identical sets).
struct Dropped {
  uint64_t weight = 0;   // documents
  uint64_t largest = 0;  // documents of the largest bucket dropped
};
Dropped CollectEntries(const SignedCorpus& corpus, const uint64_t* column, size_t count,
                       size_t first, bool drop_singletons, HugePageVector<uint64_t>& filter,
                       EntryVector& entries) {
  entries.clear();
  const auto collect = [&](auto keep) {
    Dropped dropped;
    for (size_t i = 0; i < count; ++i) {
      if (column[i] == kNoBandKey) continue;
      if (keep(column[i])) {
        entries.push_back({column[i], static_cast<uint32_t>(first + i)});
      } else {
        const uint64_t weight = corpus.group_size(first + i);
        dropped.weight += weight;
        dropped.largest = std::max(dropped.largest, weight);
      }
    }
    return dropped;
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

namespace {

// The band keys of the documents held in memory, one column per band: a
// lean corpus keeps them (from first_resident() on; the others are in its
// spill), otherwise they are computed into *computed (band * n + doc).
// Documents with no shingles have no keys (all kNoBandKey).
std::vector<const uint64_t*> BandColumns(const SignedCorpus& corpus, Banding banding, int threads,
                                         std::vector<uint64_t>* computed) {
  const size_t n = corpus.size();
  const uint32_t bands = banding.bands;
  std::vector<const uint64_t*> columns(bands);
  if (corpus.lean()) {
    for (uint32_t band = 0; band < bands; ++band) columns[band] = corpus.band_column(band).data();
    return columns;
  }
  computed->resize(n * bands);
  ParallelFor(n, threads, [&](size_t begin, size_t end, int) {
    std::vector<uint64_t> keys(bands);
    for (size_t doc = begin; doc < end; ++doc) {
      if (corpus.shingle_count(doc) == 0) {
        std::fill(keys.begin(), keys.end(), kNoBandKey);
      } else {
        BandKeys(corpus.signature(doc), banding, absl::MakeSpan(keys));
      }
      for (uint32_t band = 0; band < bands; ++band) (*computed)[band * n + doc] = keys[band];
    }
  });
  for (uint32_t band = 0; band < bands; ++band) columns[band] = computed->data() + band * n;
  return columns;
}

// Working space of one worker, kept from band to band, in huge pages (fresh
// small pages for every band cost a page fault per 4 KiB).
struct Space {
  EntryVector entries, scratch;
  HugePageVector<uint32_t> offsets;
  HugePageVector<uint64_t> filter;
};

// What the search of one band found.
struct BandResult {
  std::vector<PackedPair> pairs;  // ascending, possibly repeated
  BandStats stats;
  absl::Status status;
  bool crowded = false;
};

// How the search runs (see Search).
struct SearchPlan {
  const SignedCorpus& corpus;
  uint64_t max_bucket;
  Unit unit;
  const GroupMembers* groups;
  const BandSpill* spill;
  bool in_memory;  // no spilled runs: buckets of one are counted, not sorted
};

// The pairs of one band: its entries in memory, merged with its spilled
// runs when there are any.
void SearchBand(const SearchPlan& plan, uint32_t band, const uint64_t* column, Space& space,
                BandResult* out) {
  const SignedCorpus& corpus = plan.corpus;
  const size_t first = corpus.lean() ? corpus.first_resident() : 0;
  // Expanded groups make pairs from buckets of one entry too.
  const bool drop_singletons = plan.in_memory && plan.unit != Unit::kExpanded;
  const Dropped dropped = CollectEntries(corpus, column, corpus.size() - first, first,
                                         drop_singletons, space.filter, space.entries);
  BucketPairer pairer(plan.max_bucket, &out->pairs, &out->stats, corpus, plan.unit, plan.groups);
  SortEntries(space.entries, space.scratch, space.offsets);
  if (plan.in_memory) {
    out->stats.entries += dropped.weight;
    out->stats.largest = std::max(out->stats.largest, dropped.largest);
    out->crowded = dropped.largest > plan.max_bucket;
    for (const BucketEntry& entry : space.entries) pairer.Push(entry);
  } else {
    BandMerger merger(*plan.spill, band, space.entries);
    BucketEntry entry;
    for (;;) {
      absl::StatusOr<bool> more = merger.Next(&entry);
      if (!more.ok()) out->status = more.status();
      if (!more.ok() || !*more) break;
      pairer.Push(entry);
    }
  }
  pairer.Finish();
  out->crowded |= pairer.crowded();
  std::sort(out->pairs.begin(), out->pairs.end());
}

// The search itself (see FindSpilledCandidatePairs), over documents or
// groups of identical sets (`unit`; `groups` for kExpanded). *crowded: for
// kRepresentatives, whether a bucket held more than max_bucket documents.
absl::StatusOr<std::vector<PackedPair>> Search(const SignedCorpus& corpus, Banding banding,
                                               int threads, CandidateStats* stats,
                                               uint64_t max_bucket, Unit unit,
                                               const GroupMembers* groups, bool* crowded) {
  std::vector<uint64_t> computed;
  const std::vector<const uint64_t*> columns = BandColumns(corpus, banding, threads, &computed);
  const BandSpill* spill = corpus.spill();
  const SearchPlan plan{corpus, max_bucket, unit, groups, spill,
                        spill == nullptr || spill->runs() == 0};
  std::vector<BandResult> bands(banding.bands);
  std::vector<Space> spaces(std::max(1, threads));
  ParallelFor(bands.size(), threads, [&](size_t begin, size_t end, int worker) {
    for (size_t band = begin; band < end; ++band) {
      SearchBand(plan, static_cast<uint32_t>(band), columns[band], spaces[worker], &bands[band]);
    }
  });
  std::vector<PackedPair> pairs;
  *crowded = false;
  for (BandResult& band : bands) {
    if (!band.status.ok()) return band.status;
    stats->bucket_entries += band.stats.entries;
    stats->largest_bucket = std::max(stats->largest_bucket, band.stats.largest);
    stats->oversized_buckets += band.stats.oversized;
    *crowded |= band.crowded;
    pairs.insert(pairs.end(), band.pairs.begin(), band.pairs.end());
    std::vector<PackedPair>().swap(band.pairs);
  }
  std::sort(pairs.begin(), pairs.end());
  pairs.erase(std::unique(pairs.begin(), pairs.end()), pairs.end());
  stats->candidate_pairs = pairs.size();
  return pairs;
}

}  // namespace

absl::StatusOr<std::vector<PackedPair>> FindSpilledCandidatePairs(const SignedCorpus& corpus,
                                                                  Banding banding, int threads,
                                                                  CandidateStats* stats,
                                                                  uint64_t max_bucket) {
  bool crowded = false;
  return Search(corpus, banding, threads, stats, max_bucket,
                corpus.groups_identical() ? Unit::kExpanded : Unit::kDocuments,
                corpus.groups_identical() ? std::make_unique<GroupMembers>(corpus).get() : nullptr,
                &crowded);
}

absl::StatusOr<GroupedCandidates> FindGroupedCandidatePairs(const SignedCorpus& corpus,
                                                            Banding banding, int threads,
                                                            CandidateStats* stats,
                                                            uint64_t max_bucket) {
  GroupedCandidates result;
  CandidateStats found;
  bool crowded = false;
  absl::StatusOr<std::vector<PackedPair>> pairs = Search(
      corpus, banding, threads, &found, max_bucket, Unit::kRepresentatives, nullptr, &crowded);
  if (!pairs.ok()) return pairs.status();
  if (!crowded) {
    // The document pairs: every member pair of each pair of representatives,
    // and every two members of one group (identical sets share every band).
    found.candidate_pairs = 0;
    for (PackedPair pair : *pairs) {
      found.candidate_pairs +=
          uint64_t{corpus.group_size(PairFirst(pair))} * corpus.group_size(PairSecond(pair));
    }
    for (size_t doc = 0; doc < corpus.size(); ++doc) {
      const uint64_t size = corpus.shingle_count(doc) == 0 ? 0 : corpus.group_size(doc);
      found.candidate_pairs += size * (size - (size > 0)) / 2;
    }
    *stats = found;
    result.pairs = *std::move(pairs);
    return result;
  }
  const GroupMembers groups(corpus);
  pairs = Search(corpus, banding, threads, stats, max_bucket, Unit::kExpanded, &groups, &crowded);
  if (!pairs.ok()) return pairs.status();
  result.pairs = *std::move(pairs);
  result.expanded = true;
  return result;
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
