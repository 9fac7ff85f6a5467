#include "kindred/reload.h"

#include <algorithm>
#include <memory>

#include "absl/strings/str_cat.h"
#include "kindred/banding.h"
#include "kindred/parallel.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"

namespace kindred {

absl::Status ReloadShingles(const std::vector<ResolvedInput>& inputs, const InputOptions& options,
                            const SignatureSettings& settings, absl::Span<const uint32_t> docs,
                            int threads, SignedCorpus* corpus) {
  if (docs.empty()) return absl::OkStatus();
  threads = std::max(1, threads);
  auto made = Shingler::CreateMany(settings, threads);
  if (!made.ok()) return made.status();
  std::vector<std::unique_ptr<Shingler>> shinglers = *std::move(made);
  const Signer signer(settings);
  const uint32_t perms = settings.perms;
  const Banding banding = corpus->lean_banding();

  auto reader = CorpusReader::Reopen(inputs, options);
  if (!reader.ok()) return reader.status();
  std::vector<uint8_t> wanted(corpus->size(), 0);
  for (uint32_t doc : docs) wanted[doc] = 1;
  (*reader)->SetFilter(
      [&wanted](uint64_t ordinal) { return ordinal < wanted.size() && wanted[ordinal] != 0; });

  std::vector<Document> batch;
  std::vector<ShingleSet> sets;
  std::vector<uint32_t> signatures;
  std::vector<absl::Status> errors;
  std::vector<uint64_t> keys(banding.bands);
  size_t found = 0;
  for (;;) {
    absl::StatusOr<size_t> count = (*reader)->ReadBatch(&batch, 4096, 16 << 20);
    if (!count.ok()) return count.status();
    if (*count == 0) break;
    const size_t n = batch.size();
    sets.resize(n);
    signatures.resize(n * perms);
    errors.assign(n, absl::OkStatus());
    ParallelFor(n, threads, [&](size_t begin, size_t end, int worker) {
      for (size_t i = begin; i < end; ++i) {
        errors[i] = shinglers[worker]->Shingle(batch[i].text, &sets[i]);
        signer.Sign(sets[i], absl::MakeSpan(&signatures[i * perms], perms));
      }
    });
    for (size_t i = 0; i < n; ++i) {
      const Document& doc = batch[i];
      const uint64_t ordinal = doc.ordinal;
      const auto signature = absl::MakeConstSpan(&signatures[i * perms], perms);
      bool same = ordinal < corpus->size() && errors[i].ok() && doc.id == corpus->id(ordinal) &&
                  sets[i].empty() == (corpus->shingle_count(ordinal) == 0);
      if (same && !sets[i].empty()) {
        BandKeys(signature, banding, absl::MakeSpan(keys));
        same = SignedCorpus::BandKeyDigest(keys) == corpus->band_key_digest(ordinal);
      }
      if (!same) {
        const std::string where =
            doc.source.line > 0 ? absl::StrCat(doc.source.path, ":", doc.source.line)
                                : doc.source.path;
        return absl::InvalidArgumentError(
            absl::StrCat(where, ": document \"", doc.id,
                         "\" changed while kindred was reading the corpus; run again"));
      }
      corpus->AttachShingles(static_cast<uint32_t>(ordinal), sets[i], signature);
      ++found;
    }
  }
  if (found != docs.size()) {
    return absl::InvalidArgumentError(
        absl::StrCat("the corpus changed while kindred was reading it: ", docs.size() - found,
                     " documents could not be found again; run again"));
  }
  return absl::OkStatus();
}

}  // namespace kindred
