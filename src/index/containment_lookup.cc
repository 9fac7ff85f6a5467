#include "index/containment_lookup.h"

#include <algorithm>

#include "index/containment_keys.h"
#include "index/key_table.h"
#include "kindred/banding.h"

namespace kindred::index {

bool ContainmentLookup::UsesStoredKeys(const IndexReader& reader, const MatchSettings& match) {
  const IndexSettings& settings = reader.settings();
  const ContainmentKeys& keys = settings.containment;
  return keys.stored() && keys.threshold == match.threshold &&
         keys.min_size == match.min_contained_size && reader.bands() == settings.bands &&
         reader.rows() == settings.rows;
}

std::unique_ptr<ContainmentLookup> ContainmentLookup::Create(const IndexReader& reader,
                                                             const MatchSettings& match,
                                                             const ContainmentLookup* earlier) {
  const IndexSettings& settings = reader.settings();
  const bool stored = UsesStoredKeys(reader, match);
  const ContainmentKeys keys =
      stored ? settings.containment : ContainmentKeysFor(match.threshold, match.min_contained_size);
  std::unique_ptr<ContainmentLookup> lookup(
      new ContainmentLookup(reader, keys, PlanOf(keys, settings.signature.perms), stored));
  if (stored) return lookup;
  // No stored keys for this query: every document's, in memory.
  const uint32_t count = reader.document_count();
  if (earlier == nullptr || earlier->stored_ || earlier->covered_ > count) {
    lookup->base_ = std::make_shared<const KeyTable>(lookup->BuildTable(0, count));
    lookup->covered_ = count;
    return lookup;
  }
  // The earlier base table is shared; the keys added since join its recent
  // part, which is merged into a new base once it is no longer small.
  const KeyTable added = lookup->BuildTable(earlier->covered_, count);
  KeyTable recent(earlier->recent_.size() + added.size());
  std::merge(earlier->recent_.begin(), earlier->recent_.end(), added.begin(), added.end(),
             recent.begin());
  const size_t small = std::max<size_t>(size_t{1} << 16, earlier->base_->size() / 16);
  if (recent.size() <= small) {
    lookup->base_ = earlier->base_;
    lookup->recent_ = std::move(recent);
  } else {
    auto merged = std::make_shared<KeyTable>(earlier->base_->size() + recent.size());
    std::merge(earlier->base_->begin(), earlier->base_->end(), recent.begin(), recent.end(),
               merged->begin());
    lookup->base_ = std::move(merged);
  }
  lookup->covered_ = count;
  return lookup;
}

KeyTable ContainmentLookup::BuildTable(uint32_t from, uint32_t to) const {
  const IndexSettings& settings = reader_.settings();
  return BuildKeyTable(KeyPlan{Banding{settings.bands, settings.rows}, plan_}, from, to,
                       [this](uint32_t doc) {
                         return KeyedDocument{reader_.signature(doc), reader_.shingle_count(doc)};
                       });
}

void ContainmentLookup::Lookup(uint64_t key, uint64_t max_bucket, std::vector<uint32_t>* out,
                               uint64_t* crowded) const {
  if (stored_) {
    const uint64_t keys[1] = {key};
    reader_.Candidates(keys, out, max_bucket, crowded);
    return;
  }
  const auto range = [key](const KeyTable& table) {
    return std::equal_range(table.begin(), table.end(), std::make_pair(key, uint32_t{0}),
                            [](const auto& x, const auto& y) { return x.first < y.first; });
  };
  // Documents of the base table come before the recent ones, so the first
  // live one found is the first live one of the bucket.
  const auto ranges = {range(*base_), range(recent_)};
  uint64_t size = 0;
  for (const auto& [lo, hi] : ranges) size += hi - lo;
  const bool capped = max_bucket > 0 && size > max_bucket;
  if (capped && crowded != nullptr) ++*crowded;
  for (const auto& [lo, hi] : ranges) {
    for (auto it = lo; it != hi; ++it) {
      if (!reader_.is_live(it->second)) continue;
      out->push_back(it->second);
      if (capped) return;
    }
  }
}

std::shared_ptr<const ContainmentLookup> ContainmentLookupCache::For(const IndexReader& reader,
                                                                     const MatchSettings& match) {
  std::lock_guard<std::mutex> lock(mu_);
  std::shared_ptr<const ContainmentLookup>& slot =
      lookups_[std::make_pair(match.threshold, match.min_contained_size)];
  if (slot != nullptr && slot->stored() != ContainmentLookup::UsesStoredKeys(reader, match)) {
    slot = nullptr;  // the reader's banding changed
  }
  if (slot == nullptr || (!slot->stored() && slot->covered() < reader.document_count())) {
    slot = ContainmentLookup::Create(reader, match, slot.get());
    tables_built_ += !slot->stored();
  }
  return slot;
}

uint64_t ContainmentLookupCache::tables_built() const {
  std::lock_guard<std::mutex> lock(mu_);
  return tables_built_;
}

void ContainmentLookup::Candidates(absl::Span<const uint32_t> signature, uint32_t shingle_count,
                                   uint64_t max_bucket, std::vector<uint32_t>* out,
                                   uint64_t* crowded) const {
  const int query = shingle_count == 0 ? -1 : plan_->PartitionOf(shingle_count);
  if (query < 0) return;  // under the least contained size: in no pair
  const size_t start = out->size();
  std::vector<uint64_t> keys;
  std::vector<uint32_t> found;
  for (const Banding& banding : NeededBandings(*plan_, query)) {
    keys.resize(banding.bands);
    BandKeys(signature, banding, absl::MakeSpan(keys));
    for (uint32_t band = 0; band < banding.bands; ++band) {
      if (keys[band] == kNoBandKey) continue;
      found.clear();
      Lookup(keys[band], max_bucket, &found, crowded);
      for (uint32_t doc : found) {
        const uint32_t size = reader_.shingle_count(doc);
        const int other = size == 0 ? -1 : plan_->PartitionOf(size);
        if (other >= 0 && Proposes(*plan_, query, other, banding.rows, band)) out->push_back(doc);
      }
    }
  }
  std::sort(out->begin() + start, out->end());
  out->erase(std::unique(out->begin() + start, out->end()), out->end());
}

}  // namespace kindred::index
