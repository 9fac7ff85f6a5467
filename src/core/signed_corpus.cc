#include "kindred/signed_corpus.h"

#include <algorithm>
#include <cstring>
#include <memory>
#include <utility>

#include "absl/container/flat_hash_map.h"
#include "core/band_spill.h"
#include "core/block_arena.h"
#include "core/contract_internal.h"
#include "xxhash.h"

namespace kindred {
namespace {

// Frees a key table (HugePageAllocator, `values` keys).
struct FreeKeyTable {
  size_t values = 0;
  void operator()(uint64_t* table) const {
    HugePageAllocator<uint64_t>().deallocate(table, values);
  }
};

}  // namespace

struct SignedCorpus::Store {
  HugePageVector<std::string> ids;
  HugePageVector<KeepFacts> facts;
  HugePageVector<DocumentOrigin> origins;
  HugePageVector<const uint64_t*> shingle_data;
  HugePageVector<uint32_t> shingle_count;
  HugePageVector<const uint32_t*> signature_data;
  BlockArena<uint64_t> shingles;
  BlockArena<uint32_t> signatures;
  // Lean only: one allocation (huge pages) holding a column of key_stride_
  // keys per band.
  std::unique_ptr<uint64_t[], FreeKeyTable> key_table;
  HugePageVector<uint32_t> band_key_digests;  // lean only
  std::unique_ptr<BandSpill> spill;
  // Grouping identical sets.
  HugePageVector<uint32_t> rep_of;
  HugePageVector<uint32_t> group_size;
  absl::flat_hash_map<Digest, uint32_t> by_set;  // set digest -> representative
  std::vector<uint64_t> no_keys;                 // bands x kNoBandKey
};

SignedCorpus::SignedCorpus(uint32_t perms) : perms_(perms), store_(std::make_unique<Store>()) {}

SignedCorpus::~SignedCorpus() = default;

SignedCorpus::SignedCorpus(SignedCorpus&& other) noexcept { *this = std::move(other); }

SignedCorpus& SignedCorpus::operator=(SignedCorpus&& other) noexcept {
  perms_ = other.perms_;
  banding_ = other.banding_;
  store_ = std::exchange(other.store_, std::make_unique<Store>());
  view_ = std::exchange(other.view_, View{});
  key_stride_ = std::exchange(other.key_stride_, 0);
  spill_budget_ = other.spill_budget_;
  spill_dir_ = std::move(other.spill_dir_);
  spill_fs_ = other.spill_fs_;
  first_resident_ = std::exchange(other.first_resident_, 0);
  identical_ = other.identical_;
  set_budget_ = other.set_budget_;
  kept_set_bytes_ = other.kept_set_bytes_;
  return *this;
}

void SignedCorpus::Sync() {
  const Store& s = *store_;
  view_.size = s.ids.size();
  view_.ids = s.ids.data();
  view_.facts = s.facts.data();
  view_.origins = s.origins.data();
  view_.shingle_data = s.shingle_data.data();
  view_.shingle_count = s.shingle_count.data();
  view_.signature_data = s.signature_data.data();
  view_.key_table = s.key_table.get();
  view_.band_key_digests = s.band_key_digests.data();
  view_.rep_of = s.rep_of.data();
  view_.group_size = s.group_size.data();
  view_.spill = s.spill.get();
}

SignedCorpus SignedCorpus::Lean(uint32_t perms, Banding banding) {
  SignedCorpus corpus(perms);
  corpus.banding_ = banding;
  return corpus;
}

void SignedCorpus::Reserve(size_t documents) {
  store_->ids.reserve(documents);
  store_->facts.reserve(documents);
  store_->origins.reserve(documents);
  store_->shingle_count.reserve(documents);
  store_->shingle_data.reserve(documents);
  store_->signature_data.reserve(documents);
  if (lean()) {
    if (documents > first_resident_ + key_stride_) GrowKeyTable(documents - first_resident_);
    store_->band_key_digests.reserve(documents);
  }
  if (identical_) {
    store_->rep_of.reserve(documents);
    store_->group_size.reserve(documents);
  }
  Sync();
}

void SignedCorpus::Clear() {
  internal::RequireContract(store_->spill == nullptr, "Clear needs a corpus that has not spilled");
  store_->ids.clear();
  store_->facts.clear();
  store_->origins.clear();
  store_->shingle_data.clear();
  store_->shingle_count.clear();
  store_->signature_data.clear();
  store_->band_key_digests.clear();
  store_->rep_of.clear();
  store_->group_size.clear();
  store_->by_set.clear();
  kept_set_bytes_ = 0;
  store_->shingles.Reset();
  store_->signatures.Reset();
  first_resident_ = 0;
  Sync();
}

size_t SignedCorpus::memory_bytes() const {
  constexpr size_t kPerDocument = sizeof(std::string) + sizeof(KeepFacts) + sizeof(DocumentOrigin) +
                                  3 * sizeof(void*) + 2 * sizeof(uint32_t);
  return store_->shingles.bytes_used() + store_->signatures.bytes_used() + resident_key_bytes() +
         store_->ids.size() * kPerDocument;
}

void SignedCorpus::Add(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                       absl::Span<const uint64_t> shingles, absl::Span<const uint32_t> signature) {
  if (lean()) {
    std::vector<uint64_t> keys(banding_.bands);
    LeanBandKeys(banding_, shingles.empty(), signature, absl::MakeSpan(keys));
    AddKeys(std::move(id), facts, origin, static_cast<uint32_t>(shingles.size()), keys);
    return;
  }
  store_->ids.push_back(std::move(id));
  store_->facts.push_back(facts);
  store_->origins.push_back(origin);
  store_->shingle_count.push_back(static_cast<uint32_t>(shingles.size()));
  store_->shingle_data.push_back(store_->shingles.Append(shingles.data(), shingles.size()));
  store_->signature_data.push_back(store_->signatures.Append(signature.data(), signature.size()));
  Sync();
}

void SignedCorpus::AddWithBandKeys(std::string id, const KeepFacts& facts,
                                   const DocumentOrigin& origin, uint32_t shingle_count,
                                   absl::Span<const uint64_t> band_keys) {
  AddKeys(std::move(id), facts, origin, shingle_count, band_keys);
}

void SignedCorpus::AddKeys(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                           uint32_t shingle_count, absl::Span<const uint64_t> keys) {
  const size_t resident = store_->ids.size() - first_resident_;  // before this document
  if (resident == key_stride_) GrowKeyTable(std::max<size_t>(1024, 2 * key_stride_));
  for (uint32_t band = 0; band < banding_.bands; ++band) {
    store_->key_table[band * key_stride_ + resident] = keys[band];
  }
  store_->ids.push_back(std::move(id));
  store_->facts.push_back(facts);
  store_->origins.push_back(origin);
  store_->shingle_count.push_back(shingle_count);
  store_->band_key_digests.push_back(BandKeyDigest(keys.first(banding_.bands)));
  store_->shingle_data.push_back(nullptr);
  store_->signature_data.push_back(nullptr);
  Sync();
}

void SignedCorpus::GrowKeyTable(size_t docs) {
  const size_t values = docs * banding_.bands;
  std::unique_ptr<uint64_t[], FreeKeyTable> table(HugePageAllocator<uint64_t>().allocate(values),
                                                  FreeKeyTable{values});
  const size_t resident = store_->ids.size() - first_resident_;
  for (uint32_t band = 0; band < banding_.bands && resident > 0; ++band) {
    std::memcpy(table.get() + band * docs, store_->key_table.get() + band * key_stride_,
                resident * sizeof(uint64_t));
  }
  store_->key_table = std::move(table);
  key_stride_ = docs;
}

void SignedCorpus::LeanBandKeys(Banding banding, bool empty, absl::Span<const uint32_t> signature,
                                absl::Span<uint64_t> out) {
  if (empty) {
    std::fill(out.begin(), out.end(), kNoBandKey);
  } else {
    BandKeys(signature, banding, out);
  }
}

uint32_t SignedCorpus::BandKeyDigest(absl::Span<const uint64_t> keys) {
  return static_cast<uint32_t>(XXH3_64bits(keys.data(), keys.size() * sizeof(uint64_t)));
}

void SignedCorpus::SetSpill(uint64_t budget_bytes, std::string dir, FileSystem* fs) {
  spill_budget_ = budget_bytes;
  spill_dir_ = std::move(dir);
  spill_fs_ = fs;
}

absl::Status SignedCorpus::SpillBandKeys() {
  if (first_resident_ == store_->ids.size()) return absl::OkStatus();
  if (store_->spill == nullptr) {
    absl::StatusOr<std::unique_ptr<BandSpill>> spill =
        BandSpill::Create(spill_fs_, spill_dir_, banding_.bands);
    if (!spill.ok()) return spill.status();
    store_->spill = *std::move(spill);
  }
  std::vector<const uint64_t*> columns;
  for (uint32_t band = 0; band < banding_.bands; ++band) {
    columns.push_back(store_->key_table.get() + band * key_stride_);
  }
  const size_t docs = store_->ids.size() - first_resident_;
  absl::Status status =
      store_->spill->AddRun(static_cast<uint32_t>(first_resident_), docs, columns);
  Sync();
  if (!status.ok()) return status;
  // The table is kept: the next documents reuse its memory.
  first_resident_ = store_->ids.size();
  return absl::OkStatus();
}

void SignedCorpus::GroupIdenticalSets(uint64_t set_budget_bytes) {
  internal::RequireContract(lean() && store_->ids.size() == 0,
                            "GroupIdenticalSets needs an empty lean corpus");
  identical_ = true;
  set_budget_ = set_budget_bytes;
  store_->no_keys.assign(banding_.bands, kNoBandKey);
}

SignedCorpus::Digest SignedCorpus::SetDigest(absl::Span<const uint64_t> set) {
  const XXH128_hash_t hash = XXH3_128bits(set.data(), set.size() * sizeof(uint64_t));
  return Digest{hash.low64, hash.high64};
}

void SignedCorpus::AddGrouped(std::string id, const KeepFacts& facts,
                              const DocumentOrigin& origin, const SignedDocument& signed_doc) {
  const auto doc = static_cast<uint32_t>(store_->ids.size());
  uint32_t rep = doc;
  uint32_t count = signed_doc.sorted ? static_cast<uint32_t>(signed_doc.set.size())
                                     : signed_doc.bag_size;
  if (signed_doc.same_text_as >= 0) {
    const uint32_t earlier = store_->rep_of[signed_doc.same_text_as];
    if (store_->shingle_count[earlier] > 0 && signed_doc.sorted &&
        store_->signature_data[earlier] == nullptr) {
      KeepSet(earlier, signed_doc.set, signed_doc.signature);
    }
    count = store_->shingle_count[earlier];
    if (count > 0) rep = earlier;  // an empty document is nobody's duplicate
  } else if (count > 0 && signed_doc.sorted) {
    rep = store_->by_set.try_emplace(signed_doc.digest, doc).first->second;
  }
  store_->rep_of.push_back(rep);
  store_->group_size.push_back(rep == doc ? 1 : 0);
  if (rep != doc) {
    ++store_->group_size[rep];
    AddKeys(std::move(id), facts, origin, count, store_->no_keys);
    store_->band_key_digests.back() =
        store_->band_key_digests[rep];  // what reading it again must give
    return;
  }
  AddKeys(std::move(id), facts, origin, count, count > 0 ? signed_doc.band_keys : store_->no_keys);
  if (count > 0 && signed_doc.sorted) KeepSet(doc, signed_doc.set, signed_doc.signature);
}

void SignedCorpus::KeepSet(uint32_t doc, absl::Span<const uint64_t> set,
                           absl::Span<const uint32_t> signature) {
  const uint64_t bytes = set.size() * sizeof(uint64_t) + signature.size() * sizeof(uint32_t);
  if (kept_set_bytes_ + bytes > set_budget_) return;
  kept_set_bytes_ += bytes;
  const AttachedRoom room = AttachRoom(doc, set.size());
  std::memcpy(room.shingles, set.data(), set.size() * sizeof(uint64_t));
  std::memcpy(room.signature, signature.data(), signature.size() * sizeof(uint32_t));
}

SignedCorpus::AttachedRoom SignedCorpus::AttachRoom(uint32_t doc, size_t shingles) {
  uint64_t* set = store_->shingles.Allocate(shingles);
  uint32_t* signature = store_->signatures.Allocate(perms());
  store_->shingle_data[doc] = set;
  store_->shingle_count[doc] = static_cast<uint32_t>(shingles);
  store_->signature_data[doc] = signature;
  // No Sync(): nothing moved (elements written in place, arena blocks never
  // move), and workers may be reading the view meanwhile.
  return {set, signature};
}

}  // namespace kindred
