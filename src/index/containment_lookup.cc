#include "index/containment_lookup.h"

#include <algorithm>

#include "index/containment_keys.h"
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
                                                             const MatchSettings& match) {
  const IndexSettings& settings = reader.settings();
  const ContainmentKeys& stored_keys = settings.containment;
  const bool stored = UsesStoredKeys(reader, match);
  const ContainmentKeys keys =
      stored ? stored_keys : ContainmentKeysFor(match.threshold, match.min_contained_size);
  std::unique_ptr<ContainmentLookup> lookup(
      new ContainmentLookup(reader, PlanOf(keys, settings.signature.perms), stored));
  if (stored) return lookup;
  // No stored keys for this query: every live document's, in memory.
  IndexSettings memory_settings = settings;
  memory_settings.containment = keys;
  std::vector<uint64_t> doc_keys;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    if (!reader.is_live(doc)) continue;
    DocumentKeys(memory_settings, lookup->plan_.get(), reader.signature(doc),
                 reader.shingle_count(doc), &doc_keys);
    for (uint64_t key : doc_keys) lookup->memory_.emplace_back(key, doc);
  }
  std::sort(lookup->memory_.begin(), lookup->memory_.end());
  return lookup;
}

void ContainmentLookup::Lookup(uint64_t key, uint64_t max_bucket, std::vector<uint32_t>* out,
                               uint64_t* crowded) const {
  if (stored_) {
    const uint64_t keys[1] = {key};
    reader_.Candidates(keys, out, max_bucket, crowded);
    return;
  }
  const auto [lo, hi] =
      std::equal_range(memory_.begin(), memory_.end(), std::make_pair(key, uint32_t{0}),
                       [](const auto& x, const auto& y) { return x.first < y.first; });
  const bool capped = max_bucket > 0 && static_cast<uint64_t>(hi - lo) > max_bucket;
  if (capped && crowded != nullptr) ++*crowded;
  for (auto it = lo; it != hi; ++it) {
    out->push_back(it->second);  // only live documents are in the table
    if (capped) break;
  }
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
