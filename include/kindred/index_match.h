// kindred: matching documents against an index, and sweeping an index.
//
// MatchAgainstIndex is the heart of `add` and `check`: for each document of
// a signed batch, its confirmed matches among the live indexed documents
// (LSH candidates from the index's band-key tables under the reader's
// current banding, then exact verification on the stored shingle sets) and
// among the earlier documents of the batch itself.
//
// SweepIndex lists the pairs and duplicate groups of everything indexed,
// from the stored shingle sets and signatures (the corpus is not re-read).
//
// Both are deterministic whatever the thread count; thread-safe on a reader
// that is not being re-banded.
#ifndef KINDRED_INDEX_MATCH_H_
#define KINDRED_INDEX_MATCH_H_

#include <cstdint>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/candidates.h"
#include "kindred/groups.h"
#include "kindred/index.h"
#include "kindred/records.h"
#include "kindred/scored_pairs.h"
#include "kindred/settings.h"
#include "kindred/signed_corpus.h"
#include "kindred/sweep.h"

namespace kindred {

// One confirmed match of a batch document: the measured pair (verify.h)
// of the batch document Q (pair.a, sizes pair.size_a = |Q|) and the other
// document O (pair.b, pair.size_b = |O|), and where O is.
struct IndexMatch {
  ScoredPair pair;
  bool in_index = false;  // O is an indexed document (else a batch one)

  uint32_t query() const { return pair.a; }  // the batch document
  // An index document number when in_index, else an earlier batch document.
  uint32_t other() const { return pair.b; }
};

struct IndexMatchOptions {
  // threshold and measure decide what is confirmed; bands/rows are ignored
  // (the reader's banding is used; see IndexReader::UseBanding).
  MatchSettings match;
  int threads = 1;
  // Leave out indexed documents with the same id as the query (the version a
  // `replace` supersedes).
  bool exclude_same_id = false;
  // Crowded band buckets (candidates.h): an index key shared by more than
  // this many indexed documents proposes only the first live one of them
  // (0: no cap), and batch documents are paired among themselves under the
  // same cap (0: the default cap). At least 2 when not 0.
  uint64_t max_bucket = kDefaultMaxBucket;
  // When set, receives the number of crowded index keys met by all the
  // queries together. Borrowed.
  uint64_t* crowded_keys = nullptr;
  // When set, receives for each batch document the seconds its match against
  // the index took (band lookup, reading candidate sets, exact verification;
  // not signing), for latency reports. Borrowed.
  std::vector<double>* query_seconds = nullptr;
};

// Matches of every batch document, ordered by query, then indexed matches
// (ascending document number) before batch matches (ascending). Requires
// batch.perms() == the index's perms. Errors: DataLoss when a stored
// shingle set fails its checksum.
absl::StatusOr<std::vector<IndexMatch>> MatchAgainstIndex(const IndexReader& reader,
                                                          const SignedCorpus& batch,
                                                          const IndexMatchOptions& options);

// Which way a containment match goes: "id_in_match" when at least
// `threshold` of the batch document lies inside the other, "match_in_id"
// when at least that much of the other lies inside the batch document,
// "both" when both hold.
const char* ContainedWay(const IndexMatch& match, double threshold);

// Match records (README.md, "Output fields"): one per match, columns id,
// match, match_in (index or batch), jaccard, estimate,
// containment_id_in_match, containment_match_in_id, shared, shingles_id,
// shingles_match, and, when `match` is given with the measure containment,
// contained (ContainedWay). Appends to *out.
void WriteMatchRecords(RecordFormat format, absl::Span<const IndexMatch> matches,
                       const IndexReader& reader, const SignedCorpus& batch, std::string* out,
                       const MatchSettings* match = nullptr);

// The columns of those match records, in order.
std::vector<std::string> MatchRecordColumns(const MatchSettings* match = nullptr);
// The fields of one match record, in MatchRecordColumns(match) order, into
// `writer` (a row or a nested list item of a larger record; the caller
// ends it, after any fields of its own).
void WriteMatchFields(const IndexMatch& m, const IndexReader& reader, const SignedCorpus& batch,
                      const MatchSettings* match, RecordWriter* writer);

// The live documents of an index as a signed corpus (index order; shingle
// sets verified), with numbers[i] = the index document number of entry i.
absl::Status LoadIndexedCorpus(const IndexReader& reader, SignedCorpus* out,
                               std::vector<uint32_t>* numbers);

// Pairs and groups of every live indexed document under `match` (with the
// reader's banding when match.bands is 0; for containment with bands 0, by
// the containment LSH of containment_lsh.h) and `keep`; the result's corpus
// holds the live documents in index order. Errors: DataLoss.
absl::StatusOr<SweepResult> SweepIndex(const IndexReader& reader, const MatchSettings& match,
                                       KeepPolicy keep, int threads);

}  // namespace kindred

#endif  // KINDRED_INDEX_MATCH_H_
