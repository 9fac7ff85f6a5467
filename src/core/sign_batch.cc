#include "core/sign_batch.h"

#include <mutex>

#include "xxhash.h"

namespace kindred {

void SigningBatch::ResetResults(uint32_t perms, uint32_t bands) {
  const size_t n = docs.size();
  sets.resize(n);
  set_sizes.assign(n, 0);
  signatures.resize(n * perms);
  band_keys.resize(n * bands);
  text_stats.assign(n, TextStats{});
  errors.assign(n, absl::OkStatus());
  unparsable.assign(n, 0);
  text_digests.resize(n);
  set_digests.resize(n);
  same_text.assign(n, -1);
  sorted.assign(n, 0);
}

void SeenTexts::Find(SigningBatch* batch, bool keeping) const {
  std::shared_lock<std::shared_mutex> lock(mu_);
  for (size_t i = 0; i < batch->docs.size(); ++i) {
    if (batch->unparsable[i]) continue;
    if (auto it = texts_.find(batch->text_digests[i]); it != texts_.end()) {
      batch->same_text[i] = it->second.doc;
      batch->text_stats[i].invalid_utf8 = it->second.invalid_utf8;
      batch->sorted[i] = keeping && !it->second.has_set;
    } else {
      batch->sorted[i] = keeping;
    }
  }
}

void SeenTexts::Remember(const SigningBatch& batch, size_t first_doc, const SignedCorpus& corpus) {
  std::unique_lock<std::shared_mutex> lock(mu_);
  for (size_t i = 0; i < batch.docs.size(); ++i) {
    const int64_t same = batch.same_text[i];
    const auto doc = static_cast<uint32_t>(first_doc + i);
    const uint32_t rep = corpus.representative(same >= 0 ? same : doc);
    const bool has_set = corpus.has_shingles(rep) || corpus.shingle_count(rep) == 0;
    if (same >= 0) {
      if (has_set) texts_[batch.text_digests[i]].has_set = true;
      continue;
    }
    texts_.try_emplace(batch.text_digests[i], Seen{doc, batch.text_stats[i].invalid_utf8, has_set});
  }
}

void SignPlainBatch(SigningBatch* batch, bool lean, DocumentSigner& signer) {
  const uint32_t perms = signer.perms();
  const uint32_t bands = lean ? signer.banding().bands : 0;
  batch->ResetResults(perms, bands);
  // A lean corpus keeps no sets, and the signature of the unsorted bag is
  // that of the set: skip the sort, and reuse the signer's bag.
  for (size_t i = 0; i < batch->docs.size(); ++i) {
    Document& doc = batch->docs[i];
    if (absl::Status parsed = signer.Parse(&doc); !parsed.ok()) {
      batch->errors[i] = std::move(parsed);
      batch->unparsable[i] = 1;
      continue;
    }
    ShingleSet& set = lean ? signer.scratch_set() : batch->sets[i];
    batch->errors[i] = signer.Sign(doc, !lean, &set, &batch->text_stats[i],
                                   absl::MakeSpan(&batch->signatures[i * perms], perms),
                                   absl::MakeSpan(batch->band_keys.data() + i * bands, bands));
    batch->set_sizes[i] = static_cast<uint32_t>(set.size());
  }
}

void SignGroupedBatch(SigningBatch* batch, const SeenTexts& seen, bool keeping,
                      DocumentSigner& signer) {
  const uint32_t perms = signer.perms();
  const uint32_t bands = signer.banding().bands;
  batch->ResetResults(perms, bands);
  const size_t n = batch->docs.size();
  for (size_t i = 0; i < n; ++i) {
    Document& doc = batch->docs[i];
    if (absl::Status parsed = signer.Parse(&doc); !parsed.ok()) {
      batch->errors[i] = std::move(parsed);
      batch->unparsable[i] = 1;
      continue;
    }
    const XXH128_hash_t hash = XXH3_128bits(doc.text.data(), doc.text.size());
    batch->text_digests[i] = {hash.low64, hash.high64};
  }
  seen.Find(batch, keeping);
  for (size_t i = 0; i < n; ++i) {
    if (batch->unparsable[i] || (batch->same_text[i] >= 0 && !batch->sorted[i])) continue;
    ShingleSet& set = batch->sets[i];
    TextStats* stats = batch->same_text[i] >= 0 ? nullptr : &batch->text_stats[i];
    batch->errors[i] = signer.Sign(batch->docs[i], batch->sorted[i] != 0, &set, stats,
                                   absl::MakeSpan(&batch->signatures[i * perms], perms),
                                   absl::MakeSpan(&batch->band_keys[i * bands], bands));
    batch->set_sizes[i] = static_cast<uint32_t>(set.size());
    if (batch->sorted[i]) batch->set_digests[i] = SignedCorpus::SetDigest(set);
  }
}

}  // namespace kindred
