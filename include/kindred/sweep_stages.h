// kindred: the stages of a sweep as functions over records, callable on a
// part of a corpus.
//
//   shard --SignShard--> DocumentTable + BandKeyTable (+ SetStore)
//   BandKeyTable --PartitionBandKeys--> P tables (by key hash)
//   one partition's tables from every shard --MergeBandKeys-->
//        --FindPartitionCandidates--> CandidatePairs (crowded-bucket cap applied)
//   CandidatePairs of every partition --MergeCandidatePairs--> CandidatePairs
//   CandidatePairs + SetStore of their documents --VerifyCandidates--> ScoredPairs
//   DocumentTable + ScoredPairs --GroupDocuments--> groups
//   DocumentTable + ScoredPairs + groups --FormatSweepRecords--> the record files
//
// Run over consecutive shards with first documents numbered on from each
// other, and with the same settings and banding, these give the pairs,
// groups and records of `kindred sweep` over the whole corpus, byte for byte
// (Jaccard measure with LSH banding; exhaustive and containment searches are
// local only). Every stage is a pure function of its inputs: any thread count
// and any re-run give the same records.
//
// Thread-safety: functions over values; `threads` worker threads inside.
#ifndef KINDRED_SWEEP_STAGES_H_
#define KINDRED_SWEEP_STAGES_H_

#include <cstdint>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/band_key_table.h"
#include "kindred/banding.h"
#include "kindred/candidate_pairs.h"
#include "kindred/corpus.h"
#include "kindred/document_table.h"
#include "kindred/groups.h"
#include "kindred/records.h"
#include "kindred/scored_pairs.h"
#include "kindred/set_store.h"
#include "kindred/settings.h"
#include "kindred/signed_corpus.h"

namespace kindred {

struct ShardOptions {
  // The number of the shard's first document in the whole corpus (the count
  // of documents in the shards before it).
  uint32_t first_document = 0;
  // Added to DocumentOrigin::input of every document (the reader's inputs
  // count from 0 in each shard).
  uint32_t first_input = 0;
  // Also keep every document's shingle set and signature (SignedShard::sets).
  // Without it signing is lean, as a local sweep signs: band keys only, and
  // a document's shingle_count is the size of its bag of shingles (0 still
  // exactly when it has none).
  bool keep_sets = false;
  // SignShard only: 0, the band keys as a table (SignedShard::band_keys);
  // P >= 1, instead their table cut into P partitions, serialized
  // (SignedShard::band_key_bytes: the bytes of SerializeBandKeyPartitions),
  // written from the signer's keys without building the table.
  uint32_t key_partitions = 0;
  // ReadShardSets only: the shard's document table from SignShard (local
  // or whole-corpus numbers alike). Each document read again must have the
  // same id, text length, line and byte offset and be empty or not alike,
  // otherwise the shard changed between the readings (InputChanged naming
  // the shard, line and id). Not owned; null: no check.
  const DocumentTable* expected = nullptr;
  SignOptions sign;  // threads, batch sizes, progress (not flush)
};

struct SignedShard {
  DocumentTable documents;
  BandKeyTable band_keys;                   // sorted; empty with ShardOptions::key_partitions
  std::vector<std::string> band_key_bytes;  // with ShardOptions::key_partitions
  SetStore sets;                            // empty unless ShardOptions::keep_sets
  SignStats stats;
};

// Signs every document of `reader` (which must not have been read yet):
// its document table and its band keys under `banding`. Errors: the
// reader's, a repeated id within the shard (BadInput), invalid settings.
absl::StatusOr<SignedShard> SignShard(CorpusReader& reader, const SignatureSettings& settings,
                                      Banding banding, const ShardOptions& options);

// Reads the shard again and returns the sets and signatures of `documents`
// (numbers in the whole corpus, ascending; those outside the shard are
// ignored). Only those documents are parsed and signed; the others are
// skipped, on the calling thread (options.sign.threads is not used).
// Errors: the reader's; with options.expected, InputChanged when the shard
// no longer has the documents it had when signed (fewer documents, or one
// that differs from its row of the table).
absl::StatusOr<SetStore> ReadShardSets(CorpusReader& reader, const SignatureSettings& settings,
                                       const ShardOptions& options,
                                       absl::Span<const uint32_t> documents);

// The candidate pairs of one sorted band-key table (a partition merged from
// every shard, or a whole corpus's): every two documents sharing a bucket,
// or, in a bucket of more than max_bucket (>= 2) documents, each member with
// the bucket's smallest document (see candidates.h). Exactly the pairs and
// counts a local sweep gives for the buckets of this table.
CandidatePairs FindPartitionCandidates(const BandKeyTable& table, uint64_t max_bucket);

// Confirms each candidate on the exact sets in `sets` under `match`; returns
// the pairs that pass, ascending. Errors: InvalidRequest when a document of
// a pair has no set in `sets`.
absl::StatusOr<std::vector<ScoredPair>> VerifyCandidates(absl::Span<const PackedPair> candidates,
                                                         const SetStore& sets,
                                                         const MatchSettings& match, int threads);

// The groups of `pairs` over the documents of `table` (which must start at
// document 0 and hold every document): GroupPairs with their keep facts.
std::vector<Group> GroupDocuments(const DocumentTable& table, absl::Span<const ScoredPair> pairs,
                                  KeepPolicy keep, Grouping grouping);

struct SweepRecordOptions {
  RecordFormat format = RecordFormat::kJsonLines;
  KeepPolicy keep = KeepPolicy::kFirst;
  Grouping grouping = Grouping::kComponents;
  // Which of the three to write (the others stay empty).
  bool pairs = true, groups = true, decisions = true;
  // Threads that format the rows (the bytes are the same for any count).
  int threads = 1;
};
// The three record files of a sweep (pairs, groups, decisions), as
// `kindred sweep --output-dir` writes them.
struct SweepRecords {
  std::string pairs, groups, decisions;
};
// `table` must start at document 0 and hold every document.
SweepRecords FormatSweepRecords(const DocumentTable& table, absl::Span<const ScoredPair> pairs,
                                absl::Span<const Group> groups, const SweepRecordOptions& options);
// The same from the document columns: ids, keep facts, and whether each
// document is empty (no shingles), one per document.
void WriteSweepRecords(const SweepRecordOptions& options, absl::Span<const ScoredPair> pairs,
                       absl::Span<const Group> groups, absl::Span<const std::string> ids,
                       absl::Span<const KeepFacts> facts, absl::Span<const uint8_t> empty,
                       SweepRecords* out);
// The same, each kind in parts (records.h: RecordParts) that a writer
// appends one by one.
struct SweepRecordParts {
  RecordParts pairs, groups, decisions;
};
void WriteSweepRecordParts(const SweepRecordOptions& options, absl::Span<const ScoredPair> pairs,
                           absl::Span<const Group> groups, absl::Span<const std::string> ids,
                           absl::Span<const KeepFacts> facts, absl::Span<const uint8_t> empty,
                           SweepRecordParts* out);

}  // namespace kindred

#endif  // KINDRED_SWEEP_STAGES_H_
