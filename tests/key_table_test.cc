// The index's band-key table builder (index/key_table.h), against a plain
// loop over BandKeys on generated signatures: documents with no shingles,
// signatures with empty slots, retired (skipped) documents, numbering from
// an offset, and containment keys.
#include "index/key_table.h"

#include <algorithm>
#include <catch2/catch.hpp>
#include <memory>
#include <random>
#include <vector>

#include "index/containment_keys.h"
#include "kindred/banding.h"
#include "kindred/signer.h"

namespace kindred {
namespace {

constexpr uint32_t kPerms = 64;

struct Document {
  std::vector<uint32_t> signature;
  uint32_t shingle_count = 0;
  bool retired = false;
};

// Seeded documents: every 7th empty (all slots kEmptySlot), every 5th with
// one empty slot, every 4th retired; slot values from a small range so that
// band keys repeat between documents; sizes across several partitions.
std::vector<Document> MakeDocuments(size_t count) {
  std::mt19937 random(12);
  std::vector<Document> docs(count);
  for (size_t i = 0; i < count; ++i) {
    Document& d = docs[i];
    d.retired = i % 4 == 3;
    if (i % 7 == 0) {
      d.signature.assign(kPerms, kEmptySlot);
      continue;
    }
    d.shingle_count = 1 + random() % 5000;
    for (uint32_t slot = 0; slot < kPerms; ++slot) d.signature.push_back(random() % 3);
    if (i % 5 == 0) d.signature[random() % kPerms] = kEmptySlot;
  }
  return docs;
}

// The keys of `banding`, one by one, without kNoBandKey.
void AppendKeys(const Document& d, Banding banding, std::vector<uint64_t>* keys) {
  std::vector<uint64_t> band(banding.bands);
  BandKeys(d.signature, banding, absl::MakeSpan(band));
  for (uint64_t key : band) {
    if (key != kNoBandKey) keys->push_back(key);
  }
}

index::KeyTable Expected(const std::vector<Document>& docs, uint32_t from, Banding banding,
                         const ContainmentPlan* plan) {
  index::KeyTable rows;
  for (uint32_t doc = from; doc < docs.size(); ++doc) {
    const Document& d = docs[doc];
    if (d.retired) continue;
    std::vector<uint64_t> keys;
    AppendKeys(d, banding, &keys);
    if (plan != nullptr) {
      const int partition = d.shingle_count == 0 ? -1 : plan->PartitionOf(d.shingle_count);
      if (partition >= 0) {
        for (const Banding& b : index::NeededBandings(*plan, partition)) AppendKeys(d, b, &keys);
      }
      std::sort(keys.begin(), keys.end());
      keys.erase(std::unique(keys.begin(), keys.end()), keys.end());
    }
    for (uint64_t key : keys) rows.emplace_back(key, doc);
  }
  std::sort(rows.begin(), rows.end());
  return rows;
}

index::KeyTable Built(const std::vector<Document>& docs, uint32_t from,
                      const index::KeyPlan& plan) {
  std::vector<uint32_t> asked;
  index::KeyTable table =
      index::BuildKeyTable(plan, from, static_cast<uint32_t>(docs.size()), [&](uint32_t doc) {
        asked.push_back(doc);
        return index::KeyedDocument{docs[doc].signature, docs[doc].shingle_count,
                                    docs[doc].retired};
      });
  REQUIRE(asked.size() == docs.size() - from);
  REQUIRE(std::is_sorted(asked.begin(), asked.end()));
  return table;
}

TEST_CASE("the key table holds every live document's band keys, sorted", "[key_table]") {
  const std::vector<Document> docs = MakeDocuments(300);
  for (const Banding banding : {Banding{16, 4}, Banding{9, 7}, Banding{64, 1}}) {
    for (const uint32_t from : {0u, 37u}) {
      const index::KeyTable table = Built(docs, from, index::KeyPlan{banding, nullptr});
      CHECK(table == Expected(docs, from, banding, nullptr));
      CHECK(!table.empty());
      // Every row is a real key of a live, non-empty document from `from` on.
      CHECK(std::all_of(table.begin(), table.end(), [&](const index::KeyRow& row) {
        const Document& d = docs[row.second];
        return row.first != kNoBandKey && row.second >= from && d.shingle_count > 0 && !d.retired;
      }));
    }
  }
}

TEST_CASE("the key table adds the containment keys of each size partition", "[key_table]") {
  const std::vector<Document> docs = MakeDocuments(200);
  const ContainmentKeys keys = ContainmentKeysFor(0.7, 20);
  const std::shared_ptr<const ContainmentPlan> plan = index::PlanOf(keys, kPerms);
  REQUIRE(plan->partitions().size() > 2);
  const Banding banding{8, 8};
  const index::KeyTable table = Built(docs, 0, index::KeyPlan{banding, plan});
  CHECK(table == Expected(docs, 0, banding, plan.get()));
  CHECK(table.size() > Expected(docs, 0, banding, nullptr).size());
  // The stored plan of index settings with those containment keys.
  IndexSettings settings;
  settings.signature.perms = kPerms;
  settings.bands = banding.bands;
  settings.rows = banding.rows;
  settings.containment = keys;
  const index::KeyPlan stored = index::StoredKeyPlan(settings);
  CHECK(stored.containment == plan);
  CHECK(Built(docs, 0, stored) == table);
  settings.containment = ContainmentKeys{};
  CHECK(index::StoredKeyPlan(settings).containment == nullptr);
}

}  // namespace
}  // namespace kindred
