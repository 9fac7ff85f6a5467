// kindred: the per-document recipe of signing, for one thread.
//
// A DocumentSigner turns one document into what signing and the second
// reading need: it parses a JSON line left unparsed by the reader (or an
// HTML page), shingles the text into a sorted set or an unsorted bag, signs
// it, and computes its band keys. SignCorpus (sign_corpus.cc) and the second
// reading (reload.cc) both use it, so the two readings of a document follow
// one recipe and give the same band keys.
//
// Thread-safety: one DocumentSigner per thread (it holds the thread's
// parser, shingler and scratch buffers); Make() is thread-safe.
#ifndef KINDRED_CORE_DOCUMENT_SIGNER_H_
#define KINDRED_CORE_DOCUMENT_SIGNER_H_

#include <cstdint>
#include <memory>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/banding.h"
#include "kindred/corpus.h"
#include "kindred/settings.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"

namespace kindred {

class DocumentSigner {
 public:
  // `count` signers for documents read with `options` (the reader's
  // options()), signed per `settings`, with band keys of `banding` (may be
  // {0, 0}: no band keys). Errors: those of Shingler::Create.
  static absl::StatusOr<std::vector<DocumentSigner>> Make(const InputOptions& options,
                                                          const SignatureSettings& settings,
                                                          Banding banding, int count);

  DocumentSigner(DocumentSigner&&) noexcept = default;
  DocumentSigner& operator=(DocumentSigner&&) noexcept = default;

  uint32_t perms() const { return signer_.perms(); }
  const Banding& banding() const { return banding_; }

  // Parses a document the reader left unparsed (LineParser::Finish): does
  // nothing to one that is parsed already.
  absl::Status Parse(Document* doc) { return parser_->Finish(doc); }

  // Shingles doc's text into *set (sorted when `sorted`, else the unsorted
  // bag of Shingler::ShingleBag, whose signature is the set's), signs it
  // into `signature` (perms() slots) and, when `band_keys` is not empty,
  // writes the band keys a lean corpus keeps (SignedCorpus::LeanBandKeys;
  // banding().bands slots). `stats` may be null. Requires a parsed
  // document. On error *set, signature and keys are unspecified.
  absl::Status Sign(const Document& doc, bool sorted, ShingleSet* set, TextStats* stats,
                    absl::Span<uint32_t> signature, absl::Span<uint64_t> band_keys);

  // A set of this signer's for documents whose set is not kept (a lean
  // corpus's bags): reused from one document to the next.
  ShingleSet& scratch_set() { return scratch_; }

  // The band keys of `signature` (banding().bands slots), into a buffer of
  // this signer's; valid until the next call.
  absl::Span<const uint64_t> BandKeysOf(absl::Span<const uint32_t> signature);

 private:
  DocumentSigner(std::unique_ptr<LineParser> parser, std::unique_ptr<Shingler> shingler,
                 const SignatureSettings& settings, Banding banding);

  std::unique_ptr<LineParser> parser_;
  std::unique_ptr<Shingler> shingler_;
  Signer signer_;
  Banding banding_;
  std::vector<uint64_t> keys_;  // BandKeysOf
  ShingleSet scratch_;
};

}  // namespace kindred

#endif  // KINDRED_CORE_DOCUMENT_SIGNER_H_
