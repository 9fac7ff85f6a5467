#include "core/document_signer.h"

#include <utility>

#include "kindred/signed_corpus.h"

namespace kindred {

DocumentSigner::DocumentSigner(std::unique_ptr<LineParser> parser,
                               std::unique_ptr<Shingler> shingler,
                               const SignatureSettings& settings, Banding banding)
    : parser_(std::move(parser)),
      shingler_(std::move(shingler)),
      signer_(settings),
      banding_(banding),
      keys_(banding.bands) {}

absl::StatusOr<std::vector<DocumentSigner>> DocumentSigner::Make(const InputOptions& options,
                                                                 const SignatureSettings& settings,
                                                                 Banding banding, int count) {
  auto shinglers = Shingler::CreateMany(settings, count);
  if (!shinglers.ok()) return shinglers.status();
  std::vector<DocumentSigner> signers;
  signers.reserve(count);
  for (int i = 0; i < count; ++i) {
    signers.push_back(DocumentSigner(std::make_unique<LineParser>(options),
                                     std::move((*shinglers)[i]), settings, banding));
  }
  return signers;
}

absl::Status DocumentSigner::Sign(const Document& doc, bool sorted, ShingleSet* set,
                                  TextStats* stats, absl::Span<uint32_t> signature,
                                  absl::Span<uint64_t> band_keys) {
  absl::Status shingled = sorted ? shingler_->Shingle(doc.text, set, stats)
                                 : shingler_->ShingleBag(doc.text, set, stats);
  signer_.Sign(*set, signature);
  if (!band_keys.empty()) SignedCorpus::LeanBandKeys(banding_, set->empty(), signature, band_keys);
  return shingled;
}

absl::Span<const uint64_t> DocumentSigner::BandKeysOf(absl::Span<const uint32_t> signature) {
  BandKeys(signature, banding_, absl::MakeSpan(keys_));
  return keys_;
}

}  // namespace kindred
