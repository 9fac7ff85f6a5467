// kindred: the one-shot pipeline behind `kindred sweep`.
//
//   reader -> SignCorpus -> FindCandidatePairs (or all pairs)
//          -> [ReloadShingles] -> VerifyPairs -> GroupPairs (keep policy)
//
// Every reported pair is confirmed by the exact measure on the shingle sets.
// Results are identical for any thread count and from run to run.
//
// Functions here are thread-safe; each uses `threads` worker threads inside.
#ifndef KINDRED_SWEEP_H_
#define KINDRED_SWEEP_H_

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/banding.h"
#include "kindred/candidates.h"
#include "kindred/containment_candidates.h"
#include "kindred/corpus.h"
#include "kindred/file_io.h"
#include "kindred/groups.h"
#include "kindred/settings.h"
#include "kindred/signed_corpus.h"
#include "kindred/verify.h"  // VerifyPairs, ExhaustivePairs

namespace kindred {

// True when an LSH sweep with `match` proposes candidates by the containment
// LSH (containment_lsh.h): measure containment with automatic banding. With
// bands and rows given, containment pairs are proposed by that one Jaccard
// banding, as before.
bool UsesContainmentSearch(const MatchSettings& match);

// The bytes of shingle sets and signatures a sweep without a memory budget
// keeps from signing for verification (4 GiB: a machine of 24 GiB holds it
// beside the rest of a ten-million-document sweep).
inline constexpr uint64_t kDefaultSetMemory = uint64_t{4} << 30;

struct SweepOptions {
  SignatureSettings signature;
  MatchSettings match;  // bands/rows 0: chosen by ChooseBanding()
  KeepPolicy keep = KeepPolicy::kFirst;
  Grouping grouping = Grouping::kComponents;  // see groups.h
  bool exhaustive = false;
  uint64_t max_bucket = kDefaultMaxBucket;  // see candidates.h
  SignOptions sign;                         // threads, batch sizes, progress
  // Keep every document's shingle set and signature in the result (always
  // so for a containment search). Off, an LSH sweep keeps a lean corpus
  // (band keys only; see signed_corpus.h) and reads the documents of
  // candidate pairs a second time to verify them,
  // when every input can be read again (standard input only through its
  // copy, InputOptions::stdin_copy_path).
  bool keep_sets = false;
  // Memory budget in bytes (0: none). A lean sweep keeps its band keys in at
  // most half of it and spills the rest as sorted runs to a scratch file in
  // `scratch_dir` (src/core/band_spill.h); the other half is for ids and
  // per-document facts (about 100 bytes plus the id each) and the batch
  // being signed. Results are the same with and without spilling.
  // The exact shingle sets of the documents (one per group of identical
  // sets) are kept for verification while they take at most a quarter of
  // `memory`, or kDefaultSetMemory without a budget; the documents of
  // candidate pairs whose sets were not kept are read a second time.
  uint64_t memory = 0;
  std::string scratch_dir = "/tmp";
  // Where the scratch file of spilled band keys is made (borrowed).
  FileSystem* file_system = DefaultFileSystem();
};

struct SweepStats {
  SignStats sign;
  CandidateStats candidates;
  Banding banding;  // the banding used (zero when exhaustive or containment search)
  // Measure containment: the containment search's figures (partitions and
  // candidates when UsesContainmentSearch; the documents left out by the
  // least contained size, exhaustive or not).
  bool containment_search = false;
  uint32_t containment_partitions = 0;
  ContainmentCandidateStats containment;
  uint64_t confirmed_pairs = 0;
  uint64_t groups = 0;
  uint64_t drops = 0;
  uint64_t spilled_bytes = 0;  // band keys written to the scratch file
  uint64_t spill_runs = 0;
  double sign_seconds = 0, match_seconds = 0;
};

struct SweepResult {
  explicit SweepResult(uint32_t perms) : corpus(perms) {}
  // Lean unless kept whole (see SweepOptions::keep_sets): then only the
  // documents of candidate pairs have shingles() and signature().
  SignedCorpus corpus;
  std::vector<ScoredPair> pairs;  // ascending (a, b)
  std::vector<Group> groups;      // ordered by smallest member
  SweepStats stats;
};

// Runs the whole pipeline over `reader`, which must not have been read yet.
// Errors: the reader's (on either reading), a duplicate id, invalid
// settings, a document changed between the two readings.
absl::StatusOr<SweepResult> RunSweep(CorpusReader& reader, const SweepOptions& options);

// The pairs and groups of an already signed corpus (used by RunSweep and by
// sweeps over an index).
void MatchCorpus(const SignedCorpus& corpus, const SweepOptions& options, SweepResult* result);

}  // namespace kindred

#endif  // KINDRED_SWEEP_H_
