#include "kindred/signed_corpus.h"

#include <algorithm>
#include <cstring>
#include <memory>

#include "core/contract_internal.h"
#include "xxhash.h"

namespace kindred {

SignedCorpus SignedCorpus::Lean(uint32_t perms, Banding banding) {
  SignedCorpus corpus(perms);
  corpus.banding_ = banding;
  return corpus;
}

void SignedCorpus::Reserve(size_t documents) {
  ids_.reserve(documents);
  facts_.reserve(documents);
  origins_.reserve(documents);
  shingle_count_.reserve(documents);
  shingle_data_.reserve(documents);
  signature_data_.reserve(documents);
  if (lean()) {
    if (documents > first_resident_ + key_stride_) GrowKeyTable(documents - first_resident_);
    band_key_digests_.reserve(documents);
  }
  if (identical_) {
    rep_of_.reserve(documents);
    group_size_.reserve(documents);
  }
}

void SignedCorpus::Clear() {
  internal::RequireContract(spill_ == nullptr, "Clear needs a corpus that has not spilled");
  ids_.clear();
  facts_.clear();
  origins_.clear();
  shingle_data_.clear();
  shingle_count_.clear();
  signature_data_.clear();
  band_key_digests_.clear();
  rep_of_.clear();
  group_size_.clear();
  by_set_.clear();
  kept_set_bytes_ = 0;
  shingles_.Reset();
  signatures_.Reset();
  first_resident_ = 0;
}

size_t SignedCorpus::memory_bytes() const {
  constexpr size_t kPerDocument = sizeof(std::string) + sizeof(KeepFacts) + sizeof(DocumentOrigin) +
                                  3 * sizeof(void*) + 2 * sizeof(uint32_t);
  return shingles_.bytes_used() + signatures_.bytes_used() + resident_key_bytes() +
         size() * kPerDocument;
}

void SignedCorpus::Add(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                       absl::Span<const uint64_t> shingles, absl::Span<const uint32_t> signature) {
  if (lean()) {
    std::vector<uint64_t> keys(banding_.bands);
    LeanBandKeys(banding_, shingles.empty(), signature, absl::MakeSpan(keys));
    AddKeys(std::move(id), facts, origin, static_cast<uint32_t>(shingles.size()), keys);
    return;
  }
  ids_.push_back(std::move(id));
  facts_.push_back(facts);
  origins_.push_back(origin);
  shingle_count_.push_back(static_cast<uint32_t>(shingles.size()));
  shingle_data_.push_back(shingles_.Append(shingles.data(), shingles.size()));
  signature_data_.push_back(signatures_.Append(signature.data(), signature.size()));
}

void SignedCorpus::AddWithBandKeys(std::string id, const KeepFacts& facts,
                                   const DocumentOrigin& origin, uint32_t shingle_count,
                                   absl::Span<const uint64_t> band_keys) {
  AddKeys(std::move(id), facts, origin, shingle_count, band_keys);
}

void SignedCorpus::AddKeys(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                           uint32_t shingle_count, absl::Span<const uint64_t> keys) {
  const size_t resident = size() - first_resident_;  // before this document
  if (resident == key_stride_) GrowKeyTable(std::max<size_t>(1024, 2 * key_stride_));
  for (uint32_t band = 0; band < banding_.bands; ++band) {
    key_table_[band * key_stride_ + resident] = keys[band];
  }
  ids_.push_back(std::move(id));
  facts_.push_back(facts);
  origins_.push_back(origin);
  shingle_count_.push_back(shingle_count);
  band_key_digests_.push_back(BandKeyDigest(keys.first(banding_.bands)));
  shingle_data_.push_back(nullptr);
  signature_data_.push_back(nullptr);
}

void SignedCorpus::GrowKeyTable(size_t docs) {
  const size_t values = docs * banding_.bands;
  std::unique_ptr<uint64_t[], internal::FreeKeyTable> table(
      HugePageAllocator<uint64_t>().allocate(values), internal::FreeKeyTable{values});
  const size_t resident = size() - first_resident_;
  for (uint32_t band = 0; band < banding_.bands && resident > 0; ++band) {
    std::memcpy(table.get() + band * docs, key_table_.get() + band * key_stride_,
                resident * sizeof(uint64_t));
  }
  key_table_ = std::move(table);
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

void SignedCorpus::SetSpill(uint64_t budget_bytes, std::string dir) {
  spill_budget_ = budget_bytes;
  spill_dir_ = std::move(dir);
}

absl::Status SignedCorpus::SpillBandKeys() {
  if (first_resident_ == size()) return absl::OkStatus();
  if (spill_ == nullptr) {
    absl::StatusOr<std::unique_ptr<BandSpill>> spill =
        BandSpill::Create(spill_dir_, banding_.bands);
    if (!spill.ok()) return spill.status();
    spill_ = *std::move(spill);
  }
  std::vector<const uint64_t*> columns;
  for (uint32_t band = 0; band < banding_.bands; ++band) {
    columns.push_back(key_table_.get() + band * key_stride_);
  }
  if (absl::Status status =
          spill_->AddRun(static_cast<uint32_t>(first_resident_), size() - first_resident_, columns);
      !status.ok()) {
    return status;
  }
  // The table is kept: the next documents reuse its memory.
  first_resident_ = size();
  return absl::OkStatus();
}

void SignedCorpus::GroupIdenticalSets(uint64_t set_budget_bytes) {
  internal::RequireContract(lean() && size() == 0,
                            "GroupIdenticalSets needs an empty lean corpus");
  identical_ = true;
  set_budget_ = set_budget_bytes;
  no_keys_.assign(banding_.bands, kNoBandKey);
}

SignedCorpus::Digest SignedCorpus::SetDigest(absl::Span<const uint64_t> set) {
  const XXH128_hash_t hash = XXH3_128bits(set.data(), set.size() * sizeof(uint64_t));
  return Digest{hash.low64, hash.high64};
}

void SignedCorpus::AddGrouped(std::string id, const KeepFacts& facts,
                              const DocumentOrigin& origin, const SignedDocument& signed_doc) {
  const auto doc = static_cast<uint32_t>(size());
  uint32_t rep = doc;
  uint32_t count = signed_doc.sorted ? static_cast<uint32_t>(signed_doc.set.size())
                                     : signed_doc.bag_size;
  if (signed_doc.same_text_as >= 0) {
    const uint32_t earlier = rep_of_[signed_doc.same_text_as];
    if (shingle_count_[earlier] > 0 && signed_doc.sorted && !has_shingles(earlier)) {
      KeepSet(earlier, signed_doc.set, signed_doc.signature);
    }
    count = shingle_count_[earlier];
    if (count > 0) rep = earlier;  // an empty document is nobody's duplicate
  } else if (count > 0 && signed_doc.sorted) {
    rep = by_set_.try_emplace(signed_doc.digest, doc).first->second;
  }
  rep_of_.push_back(rep);
  group_size_.push_back(rep == doc ? 1 : 0);
  if (rep != doc) {
    ++group_size_[rep];
    AddKeys(std::move(id), facts, origin, count, no_keys_);
    band_key_digests_.back() = band_key_digests_[rep];  // what reading it again must give
    return;
  }
  AddKeys(std::move(id), facts, origin, count, count > 0 ? signed_doc.band_keys : no_keys_);
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
  uint64_t* set = shingles_.Allocate(shingles);
  uint32_t* signature = signatures_.Allocate(perms());
  shingle_data_[doc] = set;
  shingle_count_[doc] = static_cast<uint32_t>(shingles);
  signature_data_[doc] = signature;
  return {set, signature};
}

}  // namespace kindred
