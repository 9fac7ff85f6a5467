#include "kindred/signed_corpus.h"

#include <algorithm>
#include <memory>

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
    band_key_data_.reserve(documents);
    band_key_digests_.reserve(documents);
  }
}

void SignedCorpus::Clear() {
  ids_.clear();
  facts_.clear();
  origins_.clear();
  shingle_data_.clear();
  shingle_count_.clear();
  signature_data_.clear();
  band_key_data_.clear();
  band_key_digests_.clear();
  shingles_.Reset();
  signatures_.Reset();
  band_keys_.Reset();
}

size_t SignedCorpus::memory_bytes() const {
  constexpr size_t kPerDocument = sizeof(std::string) + sizeof(KeepFacts) +
                                  sizeof(DocumentOrigin) + 3 * sizeof(void*) + 2 * sizeof(uint32_t);
  return shingles_.bytes_used() + signatures_.bytes_used() + band_keys_.bytes_used() +
         size() * (kPerDocument + (lean() ? sizeof(void*) : 0));
}

void SignedCorpus::Add(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                       absl::Span<const uint64_t> shingles, absl::Span<const uint32_t> signature) {
  if (lean()) {
    uint64_t* keys = band_keys_.Allocate(banding_.bands);
    LeanBandKeys(banding_, shingles.empty(), signature, absl::MakeSpan(keys, banding_.bands));
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
  AddKeys(std::move(id), facts, origin, shingle_count,
          band_keys_.Append(band_keys.data(), banding_.bands));
}

void SignedCorpus::AddKeys(std::string id, const KeepFacts& facts, const DocumentOrigin& origin,
                           uint32_t shingle_count, const uint64_t* keys) {
  ids_.push_back(std::move(id));
  facts_.push_back(facts);
  origins_.push_back(origin);
  shingle_count_.push_back(shingle_count);
  band_key_data_.push_back(keys);
  band_key_digests_.push_back(BandKeyDigest(absl::MakeConstSpan(keys, banding_.bands)));
  shingle_data_.push_back(nullptr);
  signature_data_.push_back(nullptr);
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
    absl::StatusOr<std::unique_ptr<BandSpill>> spill = BandSpill::Create(spill_dir_, banding_.bands);
    if (!spill.ok()) return spill.status();
    spill_ = *std::move(spill);
  }
  const absl::Span<const uint64_t* const> resident(band_key_data_.data() + first_resident_,
                                                  size() - first_resident_);
  if (absl::Status status = spill_->AddRun(static_cast<uint32_t>(first_resident_), resident);
      !status.ok()) {
    return status;
  }
  std::fill(band_key_data_.begin() + first_resident_, band_key_data_.end(), nullptr);
  band_keys_.Reset();
  first_resident_ = size();
  return absl::OkStatus();
}

void SignedCorpus::AttachShingles(uint32_t doc, absl::Span<const uint64_t> shingles,
                                  absl::Span<const uint32_t> signature) {
  shingle_data_[doc] = shingles_.Append(shingles.data(), shingles.size());
  shingle_count_[doc] = static_cast<uint32_t>(shingles.size());
  signature_data_[doc] = signatures_.Append(signature.data(), signature.size());
}

}  // namespace kindred
