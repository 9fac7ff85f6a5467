// kindred: the upload check and the add, as every front end runs them.
//
// `kindred check`, `kindred add` and the service (`kindred serve`) share
// these steps, so that the same documents give the same matches whichever
// way they arrive:
//   1. ResolveQueryMatch: the match settings of a query from the index's
//      stored settings and what the caller asked for;
//   2. TextSigner (in-memory documents) or SignCorpus (a CorpusReader):
//      shingles and signatures under the index's signature settings;
//   3. MatchForQuery: MatchAgainstIndex with the options the command implies
//      (an add that replaces leaves out the indexed version it replaces).
//
// Thread-safety: ResolveQueryMatch, CountMatchedUploads and MatchForQuery
// are pure (MatchForQuery reads a reader that must not be re-banded
// meanwhile). A TextSigner may be used from many threads at once.
#ifndef KINDRED_INDEX_QUERY_H_
#define KINDRED_INDEX_QUERY_H_

#include <cstdint>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_writer.h"
#include "kindred/settings.h"
#include "kindred/shingles.h"
#include "kindred/signed_corpus.h"
#include "kindred/signer.h"

namespace kindred {

// What a query asks for beyond the index's stored defaults.
struct QueryRequest {
  std::optional<double> threshold;  // unset: the stored threshold
  std::optional<Measure> measure;   // unset: the stored measure
  // An explicit banding (both or neither). 0: the stored banding, or, when a
  // threshold is given, the banding ChooseBanding picks for it.
  uint32_t bands = 0;
  uint32_t rows = 0;
  // Containment: the least size of the smaller document of a pair (unset:
  // kDefaultMinContainedSize).
  std::optional<uint32_t> min_contained_size;
};

// The match settings of a query against an index with `stored` settings;
// bands and rows are set (not 0) except for the containment search (the
// measure containment without an explicit banding: both 0, see
// UsesContainmentSearch in sweep.h; its candidates come from the index's
// containment keys, or from keys computed in memory when the index stores
// none for this threshold and least contained size). When they differ from
// the stored ones, the reader that answers the query must be re-banded to
// them (IndexReader::UseBanding). Errors: InvalidArgument (a threshold outside
// (0, 1], a banding that does not fit the signatures).
absl::StatusOr<MatchSettings> ResolveQueryMatch(const IndexSettings& stored,
                                                const QueryRequest& request);

// Whether `match` needs a reader banded otherwise than the stored tables
// (never for the containment search).
bool NeedsOtherBanding(const IndexSettings& stored, const MatchSettings& match);

// How a query's candidates are found, for summaries: the banding ("15
// bands x 8 rows"), or for the containment search "containment LSH, keys
// stored in the index" or "containment LSH, keys computed in memory" (the
// index stores none for this threshold and least contained size).
std::string CandidateSearchText(const IndexReader& reader, const MatchSettings& match);

// How many of the `uploads` batch documents have at least one match among
// the indexed documents.
size_t CountMatchedUploads(absl::Span<const IndexMatch> matches, size_t uploads);

// The matches a check (policy unset) or an add under `policy` reports for
// `batch`: MatchAgainstIndex, leaving out indexed documents with the same
// id under skip and replace (a document is never its own match).
// `options.exclude_same_id` is set from the policy.
absl::StatusOr<std::vector<IndexMatch>> MatchForQuery(const IndexReader& reader,
                                                      const SignedCorpus& batch,
                                                      std::optional<DuplicateIdPolicy> policy,
                                                      IndexMatchOptions options);

// A document held in memory.
struct TextDocument {
  std::string id;
  std::string text;  // UTF-8; invalid sequences count as U+FFFD
};

// Signs in-memory documents exactly as SignCorpus signs documents read from
// files (same shingles, signature and keep facts), keeping a pool of
// shinglers so that each call does not build ICU objects again.
class TextSigner {
 public:
  // Errors: InvalidArgument (settings), Internal (ICU).
  static absl::StatusOr<std::unique_ptr<TextSigner>> Create(const SignatureSettings& settings);

  const SignatureSettings& settings() const { return settings_; }

  // Appends `documents` to *out (perms() must equal settings().perms), in
  // order. Rejects an empty id or one longer than 65535 bytes, and an id
  // repeated within `documents`, with InvalidArgument naming it (nothing
  // appended then). *stats (optional) receives documents, bytes, empty
  // documents and invalid UTF-8 counts.
  absl::Status Sign(absl::Span<const TextDocument> documents, SignedCorpus* out,
                    SignStats* stats = nullptr) const;

 private:
  explicit TextSigner(const SignatureSettings& settings);
  std::unique_ptr<Shingler> Take() const;
  void Give(std::unique_ptr<Shingler> shingler) const;

  SignatureSettings settings_;
  Signer signer_;
  mutable std::mutex mu_;
  mutable std::vector<std::unique_ptr<Shingler>> idle_;
};

}  // namespace kindred

#endif  // KINDRED_INDEX_QUERY_H_
