#include "index/key_table.h"

#include <algorithm>

#include "index/containment_keys.h"

namespace kindred::index {

KeyPlan StoredKeyPlan(const IndexSettings& settings) {
  KeyPlan plan{Banding{settings.bands, settings.rows}, nullptr};
  if (settings.containment.stored()) {
    plan.containment = PlanOf(settings.containment, settings.signature.perms);
  }
  return plan;
}

namespace {

// Appends the keys of `banding` that are not kNoBandKey; *band is scratch.
void AppendBandKeys(absl::Span<const uint32_t> signature, Banding banding,
                    std::vector<uint64_t>* band, std::vector<uint64_t>* keys) {
  band->resize(banding.bands);
  BandKeys(signature, banding, absl::MakeSpan(*band));
  for (uint64_t key : *band) {
    if (key != kNoBandKey) keys->push_back(key);
  }
}

}  // namespace

void DocumentKeys(const KeyPlan& plan, absl::Span<const uint32_t> signature, uint32_t shingle_count,
                  std::vector<uint64_t>* keys) {
  keys->clear();
  std::vector<uint64_t> band;
  AppendBandKeys(signature, plan.banding, &band, keys);
  if (plan.containment == nullptr) return;
  const int partition = shingle_count == 0 ? -1 : plan.containment->PartitionOf(shingle_count);
  if (partition >= 0) {
    for (const Banding& banding : NeededBandings(*plan.containment, partition)) {
      AppendBandKeys(signature, banding, &band, keys);
    }
  }
  std::sort(keys->begin(), keys->end());
  keys->erase(std::unique(keys->begin(), keys->end()), keys->end());
}

KeyTable BuildKeyTable(const KeyPlan& plan, uint32_t from, uint32_t to,
                       absl::FunctionRef<KeyedDocument(uint32_t doc)> document) {
  KeyTable table;
  std::vector<uint64_t> keys;
  for (uint32_t doc = from; doc < to; ++doc) {
    const KeyedDocument d = document(doc);
    if (d.skip) continue;
    DocumentKeys(plan, d.signature, d.shingle_count, &keys);
    for (uint64_t key : keys) table.emplace_back(key, doc);
  }
  std::sort(table.begin(), table.end());
  return table;
}

}  // namespace kindred::index
