#include "kindred/index_query.h"

#include <optional>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/str_cat.h"
#include "core/plural.h"
#include "index/containment_lookup.h"
#include "kindred/banding.h"
#include "kindred/errors.h"
#include "kindred/sweep.h"
#include "kindred/text.h"

namespace kindred {

absl::StatusOr<MatchSettings> ResolveQueryMatch(const IndexSettings& stored,
                                                const QueryRequest& request) {
  MatchSettings match;
  match.threshold = request.threshold.value_or(stored.threshold);
  match.measure = request.measure.value_or(stored.measure);
  match.bands = request.bands;
  match.rows = request.rows;
  if (request.min_contained_size.has_value()) {
    match.min_contained_size = *request.min_contained_size;
  }
  if (absl::Status status = match.Validate(stored.signature); !status.ok()) return status;
  if (UsesContainmentSearch(match)) return match;
  // The stored banding was chosen for the stored threshold: kept unless
  // the query names a threshold.
  std::optional<Banding> kept;
  if (!request.threshold.has_value()) kept = Banding{stored.bands, stored.rows};
  const Banding banding = ResolveBanding(match, stored.signature.perms, kept);
  match.bands = banding.bands;
  match.rows = banding.rows;
  return match;
}

bool NeedsOtherBanding(const IndexSettings& stored, const MatchSettings& match) {
  if (match.bands == 0) return false;  // the containment search
  return match.bands != stored.bands || match.rows != stored.rows;
}

std::string CandidateSearchText(const IndexReader& reader, const MatchSettings& match) {
  if (!UsesContainmentSearch(match)) return BandsByRows(reader.bands(), reader.rows());
  return index::ContainmentLookup::UsesStoredKeys(reader, match)
             ? "containment LSH, keys stored in the index"
             : "containment LSH, keys computed in memory";
}

size_t CountMatchedUploads(absl::Span<const IndexMatch> matches, size_t uploads) {
  std::vector<bool> matched(uploads);
  size_t count = 0;
  for (const IndexMatch& m : matches) {
    if (m.in_index && !matched[m.query()]) {
      matched[m.query()] = true;
      ++count;
    }
  }
  return count;
}

absl::StatusOr<std::vector<IndexMatch>> MatchForQuery(const IndexReader& reader,
                                                      const SignedCorpus& batch,
                                                      std::optional<DuplicateIdPolicy> policy,
                                                      IndexMatchOptions options) {
  // A document whose id is indexed is never its own match: with replace the
  // indexed copy is retired, with skip the new one is not added.
  options.exclude_same_id = policy.has_value() && *policy != DuplicateIdPolicy::kError;
  return MatchAgainstIndex(reader, batch, options);
}

absl::StatusOr<std::unique_ptr<TextSigner>> TextSigner::Create(const SignatureSettings& settings) {
  auto first = Shingler::Create(settings);  // validates the settings and ICU
  if (!first.ok()) return first.status();
  std::unique_ptr<TextSigner> signer(new TextSigner(settings));
  signer->idle_.push_back(std::move(*first));
  return signer;
}

TextSigner::TextSigner(const SignatureSettings& settings)
    : settings_(settings), signer_(settings) {}

std::unique_ptr<Shingler> TextSigner::Take() const {
  {
    std::lock_guard<std::mutex> lock(mu_);
    if (!idle_.empty()) {
      std::unique_ptr<Shingler> shingler = std::move(idle_.back());
      idle_.pop_back();
      return shingler;
    }
  }
  auto made = Shingler::Create(settings_);  // cannot fail: Create made one already
  return made.ok() ? std::move(*made) : nullptr;
}

void TextSigner::Give(std::unique_ptr<Shingler> shingler) const {
  std::lock_guard<std::mutex> lock(mu_);
  idle_.push_back(std::move(shingler));
}

absl::Status TextSigner::Sign(absl::Span<const TextDocument> documents, SignedCorpus* out,
                              SignStats* stats) const {
  absl::flat_hash_set<std::string_view> ids;
  for (const TextDocument& doc : documents) {
    if (doc.id.empty() || doc.id.size() > 65535) {
      return absl::InvalidArgumentError(
          absl::StrCat("document id of ", doc.id.size(), " bytes: ids have 1 to 65535 bytes"));
    }
    if (!ids.insert(doc.id).second) {
      return absl::InvalidArgumentError(absl::StrCat("duplicate id \"", doc.id, "\""));
    }
  }
  std::unique_ptr<Shingler> shingler = Take();
  if (shingler == nullptr) return absl::InternalError("cannot build a shingler");
  std::vector<std::pair<ShingleSet, TextStats>> signed_docs(documents.size());
  std::vector<uint32_t> signatures(documents.size() * settings_.perms);
  absl::Status status;
  for (size_t i = 0; i < documents.size() && status.ok(); ++i) {
    auto& [set, text] = signed_docs[i];
    status = shingler->Shingle(documents[i].text, &set, &text);
    if (!status.ok()) {
      status = Annotate(status, absl::StrCat("document \"", documents[i].id, "\""));
      break;
    }
    signer_.Sign(set, absl::MakeSpan(&signatures[i * settings_.perms], settings_.perms));
  }
  Give(std::move(shingler));
  if (!status.ok()) return status;
  for (size_t i = 0; i < documents.size(); ++i) {
    const auto& [set, text] = signed_docs[i];
    const KeepFacts facts{documents[i].text.size(), 0, false};
    out->Add(documents[i].id, facts, DocumentOrigin{}, set,
             absl::MakeConstSpan(&signatures[i * settings_.perms], settings_.perms));
    if (stats == nullptr) continue;
    stats->documents++;
    stats->bytes += documents[i].text.size();
    if (set.empty()) stats->empty_documents++;
    if (text.invalid_utf8 > 0) {
      stats->invalid_utf8_documents++;
      stats->invalid_utf8_sequences += text.invalid_utf8;
    }
  }
  return absl::OkStatus();
}

}  // namespace kindred
