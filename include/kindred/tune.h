// kindred: choosing shingle, signature and banding settings against a
// labelled sample (`kindred tune`).
//
// A setting is (shingle mode and k, perms, bands x rows, threshold). A
// labelled pair is predicted "duplicate" by a setting exactly when a sweep
// with that setting would report it: it is a candidate under the banding
// (one band key of the two signatures is equal) AND its exact measure
// (Jaccard, or containment) is at least the threshold. Against the labels
// this gives true/false positives and negatives, hence
//   precision = TP / (TP + FP)   (0 when nothing is predicted duplicate)
//   recall    = TP / (TP + FN)   (0 when no pair is labelled duplicate)
//   F-beta    = (1 + beta^2) P R / (beta^2 P + R)   (0 when P = R = 0),
// F1 being F-beta with beta = 1 (van Rijsbergen, "Information Retrieval",
// 1979, ch. 7). The cost of a setting is the number of distinct candidate
// pairs over the WHOLE corpus divided by the number of documents: what a
// sweep must verify per document.
//
// With the containment measure, a setting's search is the containment LSH
// of containment_lsh.h (LSH Ensemble, Zhu et al., VLDB 2016) instead of one
// banding: for each (shingle setting, perms, threshold) the plan for the
// corpus (size partitions from min_contained_size to the largest set, a
// banding per pair of partitions), exactly as `sweep --measure containment`
// searches. A labelled pair is then a candidate when its smaller set has at
// least min_contained_size shingles and the two agree on one band of the
// banding of their partitions; the cost counts the plan's candidate pairs
// over the corpus (crowded buckets capped as the sweep caps them). The
// bandings_per_threshold and extra_bandings of the grid do not apply.
//
// Each document is shingled once per shingle setting and signed once per
// (shingle setting, perms); every (bands x rows, threshold) is evaluated
// from those signatures. For each threshold the grid takes the best few
// bandings of RankBandings() (the first is the automatic choice) plus any
// bandings the caller lists.
//
// Ranking (best first): settings meeting the target (recall >= target
// recall) come first, by precision (higher first), then cost (lower first);
// the others follow by recall, then precision, then cost. Remaining ties go
// to fewer perms, then to grid order (shingle list order, threshold, banding
// rank). The recommendation is the first of the ranking: the cheapest
// setting reaching the target recall at the highest precision.
//
// Everything is deterministic and independent of the thread count.
// RunTune is thread-safe; it uses options.threads worker threads inside.
#ifndef KINDRED_TUNE_H_
#define KINDRED_TUNE_H_

#include <array>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"
#include "kindred/banding.h"
#include "kindred/containment_lsh.h"
#include "kindred/corpus.h"
#include "kindred/labels.h"
#include "kindred/scored_pairs.h"
#include "kindred/settings.h"

namespace kindred {

// A shingle setting: "word:5", "char:5".
struct ShingleChoice {
  ShingleMode mode = ShingleMode::kWord;
  uint32_t k = 5;
  std::string ToString() const;
  friend bool operator==(const ShingleChoice&, const ShingleChoice&) = default;
};

// Parses "word:K" or "char:K" (K in 1..64).
absl::StatusOr<ShingleChoice> ParseShingleChoice(std::string_view text);
// Parses "BxR" (e.g. "16x8"), both >= 1.
absl::StatusOr<Banding> ParseBanding(std::string_view text);

// The axes of the grid. Defaults: word 3, 5, 7; 64 and 128 perms;
// thresholds 0.50 to 0.95 by 0.05; the best 3 bandings per threshold.
struct TuneGrid {
  std::vector<ShingleChoice> shingles = {
      {ShingleMode::kWord, 3}, {ShingleMode::kWord, 5}, {ShingleMode::kWord, 7}};
  std::vector<uint32_t> perms = {64, 128};
  std::vector<double> thresholds = {0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95};
  // How many of RankBandings(threshold, perms) to evaluate (>= 1; the first
  // is the automatic choice).
  uint32_t bandings_per_threshold = 3;
  // Bandings evaluated at every threshold besides the ranked ones (those
  // that need more slots than perms are left out for that perms).
  std::vector<Banding> extra_bandings;
};

struct TuneOptions {
  TuneGrid grid;
  // The target: recall at least this (in [0, 1]). Default 0.95.
  double target_recall = 0.95;
  // F-beta's beta (> 0). Default 1 (F1).
  double beta = 1.0;
  Measure measure = Measure::kJaccard;
  // Containment only: the least size (in shingles) of the smaller document
  // of a pair (>= 1), as sweep's --min-contained-size.
  uint32_t min_contained_size = kDefaultMinContainedSize;
  // Fixed parts of the signature settings.
  uint64_t seed = kDefaultSeed;
  SignerScheme scheme = SignerScheme::kOnePermutation;
  // An id in the labels that is not in the corpus: an error, or (true) a
  // warning and the pair is left out.
  bool skip_unknown_ids = false;
  int threads = 1;
  // Called on the calling thread with a short line on what is being done.
  std::function<void(std::string_view)> progress;

  // OK, or InvalidArgument naming the first bad value.
  absl::Status Validate() const;
};

struct TuneSetting {
  ShingleChoice shingle;
  uint32_t perms = 128;
  Banding banding;  // 0x0 for a containment search
  double threshold = 0.8;
  // 1-based rank of the banding in RankBandings(threshold, perms); 1 is the
  // automatic choice (and the only one of a containment search).
  uint32_t banding_rank = 1;
  // A containment search: its plan for the corpus (shared, immutable).
  std::shared_ptr<const ContainmentPlan> plan;

  SignatureSettings Signature(const TuneOptions& options) const;
  MatchSettings Match(const TuneOptions& options) const;
  // "16x8", or "plan/5" for a containment plan of 5 size partitions.
  std::string SearchName() const;
  // "word:5 perms=128 16x8 t=0.80".
  std::string ToString() const;
};

// Counts over the labelled pairs and the measures derived from them.
struct LabelScore {
  uint32_t true_positives = 0;
  uint32_t false_positives = 0;
  uint32_t false_negatives = 0;
  uint32_t true_negatives = 0;
  double precision = 0;
  double recall = 0;
  double f1 = 0;
  double fbeta = 0;
};

// Fills precision, recall, F1 and F-beta from the four counts.
void DeriveMeasures(double beta, LabelScore* score);

struct SettingScore {
  TuneSetting setting;
  LabelScore labels;
  uint64_t candidate_pairs = 0;        // distinct, over the whole corpus
  double candidates_per_document = 0;  // the cost
  bool meets_target = false;
  // The labelled pairs this setting gets wrong: indices into
  // TuneResult::labelled, ascending.
  std::vector<uint32_t> wrong;
  // Position in the grid (shingle, perms, threshold, banding rank order):
  // the last tie-break of the ranking.
  uint32_t grid_order = 0;
};

// Candidate similarities in 20 bins of width 0.05: bin i holds [i/20,
// (i+1)/20), the last also 1.0.
using SimilarityHistogram = std::array<uint64_t, 20>;
size_t HistogramBin(double similarity);

// What one (shingle setting, perms) signing gave.
struct SignatureEvaluation {
  uint32_t shingle = 0;  // index into TuneResult::shingles
  uint32_t perms = 0;
  std::vector<double> estimates;  // per labelled pair
  // The best setting of this signing (first in ranking order among its
  // settings): is each labelled pair a candidate under its banding, and the
  // histogram of the exact measure of all its candidate pairs.
  TuneSetting best;
  std::vector<uint8_t> best_candidates;
  SimilarityHistogram best_histogram{};
};

struct ShingleEvaluation {
  ShingleChoice shingle;
  uint64_t empty_documents = 0;
  Measure measure = Measure::kJaccard;  // the measure compared with the threshold
  // Per labelled pair, measured on its exact shingle sets (verify.h): a, b
  // its documents, estimate 0 (the estimates are per signing, in
  // SignatureEvaluation).
  std::vector<ScoredPair> labelled;
  // The value of `measure` for labelled pair i.
  double MeasureOf(size_t i) const;
};

struct TuneResult {
  uint64_t documents = 0;
  std::vector<LabelledPair> labels;    // as read
  std::vector<ResolvedPair> labelled;  // the pairs evaluated
  std::vector<std::string> ids;        // the corpus's ids, document order
  std::vector<std::string> warnings;   // skipped label pairs
  std::vector<ShingleEvaluation> shingles;
  std::vector<SignatureEvaluation> signatures;
  std::vector<SettingScore> ranking;  // best first
  bool target_met = false;            // ranking[0].meets_target

  const SettingScore& recommended() const { return ranking.front(); }
  // The signing of a setting, and the measures of its shingle setting.
  const SignatureEvaluation& SignatureOf(const TuneSetting& setting) const;
  const ShingleEvaluation& ShinglesOf(const TuneSetting& setting) const;
};

// Scores `labelled` for one threshold: `candidate[i]` says whether pair i
// is a candidate, `measures[i]` is its exact measure (passes when
// PassesThreshold does, with `min_contained_size` for containment). Appends
// the wrong pairs' indices to *wrong when not null.
LabelScore ScoreLabels(absl::Span<const ResolvedPair> labelled,
                       absl::Span<const ScoredPair> measures, absl::Span<const uint8_t> candidate,
                       double threshold, Measure measure, double beta, std::vector<uint32_t>* wrong,
                       uint32_t min_contained_size = kDefaultMinContainedSize);

// True when `x` ranks before `y` (see the file comment).
bool RanksBefore(const SettingScore& x, const SettingScore& y);

using OpenCorpus = std::function<absl::StatusOr<std::unique_ptr<CorpusReader>>()>;

// Runs the grid. `open_corpus` is called once per shingle setting and must
// give the same documents each time. Errors: the reader's, a duplicate id,
// an unknown label id (unless skipped), no labelled pair left, an empty
// corpus, invalid options (InvalidArgument).
absl::StatusOr<TuneResult> RunTune(const OpenCorpus& open_corpus, std::vector<LabelledPair> labels,
                                   std::string_view labels_name, const TuneOptions& options);

// The sweep command line that uses `setting`, e.g.
// "kindred sweep archive --shingle word -k 5 --perms 128 --threshold 0.8
// --bands 16 --rows 8" (plus --measure, --signer and --seed when not the
// defaults). Inputs are quoted for a POSIX shell when needed.
std::string SweepCommandLine(const TuneSetting& setting, const TuneOptions& options,
                             absl::Span<const std::string> inputs);

}  // namespace kindred

#endif  // KINDRED_TUNE_H_
