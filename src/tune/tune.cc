// RunTune: sign once per (shingle setting, perms), evaluate every
// (banding, threshold) of the grid from those signatures.
#include "kindred/tune.h"

#include <algorithm>
#include <map>
#include <memory>
#include <tuple>
#include <utility>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "kindred/candidates.h"
#include "kindred/containment_candidates.h"
#include "kindred/errors.h"
#include "core/parallel.h"
#include "kindred/signed_corpus.h"
#include "kindred/signer.h"
#include "kindred/verify.h"
#include "tune/tune_containment.h"

namespace kindred {
namespace {

// One (threshold, banding) to evaluate for a given perms.
struct PlannedSetting {
  double threshold = 0;
  Banding banding;
  uint32_t rank = 0;
};

// The (threshold, banding) list of one perms, in grid order.
std::vector<PlannedSetting> PlanSettings(const TuneGrid& grid, uint32_t perms, Measure measure) {
  std::vector<PlannedSetting> planned;
  for (double threshold : grid.thresholds) {
    if (measure == Measure::kContainment) {  // one plan per threshold (tune.h)
      planned.push_back({threshold, Banding{0, 0}, 1});
      continue;
    }
    const std::vector<BandingCost> ranked = RankBandings(threshold, perms);
    std::vector<Banding> chosen;
    for (size_t i = 0; i < ranked.size() && i < grid.bandings_per_threshold; ++i) {
      chosen.push_back(ranked[i].banding);
    }
    for (const Banding& extra : grid.extra_bandings) {
      if (extra.slots() <= perms &&
          std::find(chosen.begin(), chosen.end(), extra) == chosen.end()) {
        chosen.push_back(extra);
      }
    }
    for (const Banding& banding : chosen) {
      uint32_t rank = 0;
      while (!(ranked[rank].banding == banding)) ++rank;
      planned.push_back({threshold, banding, rank + 1});
    }
  }
  return planned;
}

// Re-signs the documents of `base` with another perms.
SignedCorpus Resign(const SignedCorpus& base, const SignatureSettings& settings, int threads) {
  const Signer signer(settings);
  const size_t n = base.size();
  std::vector<uint32_t> signatures(n * settings.perms);
  ParallelFor(n, threads, [&](size_t begin, size_t end, int) {
    for (size_t doc = begin; doc < end; ++doc) {
      signer.Sign(base.shingles(doc),
                  absl::MakeSpan(signatures.data() + doc * settings.perms, settings.perms));
    }
  });
  SignedCorpus corpus(settings.perms);
  for (size_t doc = 0; doc < n; ++doc) {
    corpus.Add(base.id(doc), base.facts(doc), base.origin(doc), base.shingles(doc),
               absl::MakeConstSpan(signatures.data() + doc * settings.perms, settings.perms));
  }
  return corpus;
}

// Whether each labelled pair is a candidate under `banding`.
std::vector<uint8_t> LabelledCandidates(const SignedCorpus& corpus,
                                        absl::Span<const ResolvedPair> labelled, Banding banding) {
  std::vector<uint8_t> candidate(labelled.size(), 0);
  std::vector<uint64_t> keys_a(banding.bands), keys_b(banding.bands);
  for (size_t i = 0; i < labelled.size(); ++i) {
    BandKeys(corpus.signature(labelled[i].a), banding, absl::MakeSpan(keys_a));
    BandKeys(corpus.signature(labelled[i].b), banding, absl::MakeSpan(keys_b));
    for (uint32_t band = 0; band < banding.bands; ++band) {
      if (keys_a[band] != kNoBandKey && keys_a[band] == keys_b[band]) candidate[i] = 1;
    }
  }
  return candidate;
}

SimilarityHistogram CandidateHistogram(const SignedCorpus& corpus, const TuneSetting& setting,
                                       Measure measure, int threads) {
  std::vector<PackedPair> pairs;
  if (setting.plan != nullptr) {
    ContainmentCandidateStats stats;
    pairs = FindContainmentCandidates(corpus, *setting.plan, threads, &stats);
  } else {
    CandidateStats stats;
    pairs = FindCandidatePairs(corpus, setting.banding, threads, &stats);
  }
  constexpr size_t kChunk = 1 << 14;
  const size_t chunks = (pairs.size() + kChunk - 1) / kChunk;
  std::vector<SimilarityHistogram> parts(chunks, SimilarityHistogram{});
  ParallelFor(chunks, threads, [&](size_t begin, size_t end, int) {
    for (size_t chunk = begin; chunk < end; ++chunk) {
      const size_t last = std::min(pairs.size(), (chunk + 1) * kChunk);
      for (size_t i = chunk * kChunk; i < last; ++i) {
        const ScoredPair overlap = MeasureOverlap(corpus.shingles(PairFirst(pairs[i])),
                                                  corpus.shingles(PairSecond(pairs[i])));
        ++parts[chunk][HistogramBin(MeasureOf(overlap, measure))];
      }
    }
  });
  SimilarityHistogram total{};
  for (const SimilarityHistogram& part : parts) {
    for (size_t bin = 0; bin < total.size(); ++bin) total[bin] += part[bin];
  }
  return total;
}

struct Context {
  const TuneOptions* options;
  TuneResult* result;
  uint32_t grid_order = 0;
};

// What one banding (or containment plan) gives, computed once per signing:
// the number of candidate pairs over the corpus and whether each labelled
// pair is one.
struct BandingOutcome {
  uint64_t candidate_pairs = 0;
  std::vector<uint8_t> labelled_candidates;
  std::shared_ptr<const ContainmentPlan> plan;  // a containment search
};
// Keyed by (bands, rows, threshold): the threshold only for a plan.
using OutcomeKey = std::tuple<uint32_t, uint32_t, double>;
using BandingOutcomes = std::map<OutcomeKey, BandingOutcome>;

OutcomeKey KeyOf(const PlannedSetting& plan, Measure measure) {
  return {plan.banding.bands, plan.banding.rows,
          measure == Measure::kContainment ? plan.threshold : 0.0};
}

BandingOutcome PlanOutcome(const SignedCorpus& corpus, double threshold, const Context& context) {
  const TuneOptions& options = *context.options;
  if (options.progress) {
    options.progress(absl::StrFormat("perms=%u: containment candidates at t=%.2f", corpus.perms(),
                                     threshold));
  }
  BandingOutcome outcome;
  outcome.plan = tune_internal::PlanFor(corpus, threshold, options);
  ContainmentCandidateStats stats;
  FindContainmentCandidates(corpus, *outcome.plan, options.threads, &stats);
  outcome.candidate_pairs = stats.candidate_pairs;
  outcome.labelled_candidates =
      tune_internal::PlanLabelledCandidates(corpus, context.result->labelled, *outcome.plan);
  return outcome;
}

const BandingOutcome& OutcomeOf(const SignedCorpus& corpus, const PlannedSetting& plan,
                                const Context& context, BandingOutcomes* outcomes) {
  const OutcomeKey key = KeyOf(plan, context.options->measure);
  auto it = outcomes->find(key);
  if (it != outcomes->end()) return it->second;
  const TuneOptions& options = *context.options;
  if (options.measure == Measure::kContainment) {
    return outcomes->emplace(key, PlanOutcome(corpus, plan.threshold, context)).first->second;
  }
  const Banding banding = plan.banding;
  if (options.progress) {
    options.progress(absl::StrFormat("perms=%u: candidates under %ux%u", corpus.perms(),
                                     banding.bands, banding.rows));
  }
  CandidateStats stats;
  FindCandidatePairs(corpus, banding, options.threads, &stats);
  BandingOutcome outcome{stats.candidate_pairs,
                         LabelledCandidates(corpus, context.result->labelled, banding), nullptr};
  return outcomes->emplace(key, std::move(outcome)).first->second;
}

SettingScore ScoreSetting(const TuneSetting& setting, const BandingOutcome& outcome,
                          const ShingleEvaluation& shingles, size_t documents, Context* context) {
  const TuneOptions& options = *context->options;
  SettingScore score;
  score.setting = setting;
  score.labels =
      ScoreLabels(context->result->labelled, shingles.labelled, outcome.labelled_candidates,
                  setting.threshold, options.measure, options.beta, &score.wrong,
                  options.min_contained_size);
  score.candidate_pairs = outcome.candidate_pairs;
  score.candidates_per_document = static_cast<double>(score.candidate_pairs) / documents;
  score.meets_target = score.labels.recall >= options.target_recall;
  score.grid_order = context->grid_order++;
  return score;
}

// Scores every planned setting of one signing; appends to the ranking and
// the signing list.
void EvaluateSignature(const SignedCorpus& corpus, uint32_t shingle_index,
                       const std::vector<PlannedSetting>& planned, Context* context) {
  TuneResult& result = *context->result;
  const ShingleEvaluation& shingles = result.shingles[shingle_index];
  SignatureEvaluation signing;
  signing.shingle = shingle_index;
  signing.perms = corpus.perms();
  for (const ResolvedPair& pair : result.labelled) {
    signing.estimates.push_back(
        EstimateJaccard(corpus.signature(pair.a), corpus.signature(pair.b)));
  }
  BandingOutcomes outcomes;
  const size_t first_score = result.ranking.size();
  for (const PlannedSetting& plan : planned) {
    const BandingOutcome& outcome = OutcomeOf(corpus, plan, *context, &outcomes);
    const TuneSetting setting{shingles.shingle, corpus.perms(), plan.banding, plan.threshold,
                              plan.rank, outcome.plan};
    result.ranking.push_back(ScoreSetting(setting, outcome, shingles, corpus.size(), context));
  }
  const SettingScore& best =
      *std::min_element(result.ranking.begin() + first_score, result.ranking.end(), RanksBefore);
  signing.best = best.setting;
  const PlannedSetting best_plan{best.setting.threshold, best.setting.banding, 0};
  signing.best_candidates =
      outcomes[KeyOf(best_plan, context->options->measure)].labelled_candidates;
  signing.best_histogram = CandidateHistogram(corpus, best.setting, context->options->measure,
                                              context->options->threads);
  result.signatures.push_back(std::move(signing));
}

// Sign the corpus with one shingle setting and the first perms.
absl::Status SignFirst(const OpenCorpus& open_corpus, const SignatureSettings& settings,
                       const TuneOptions& options, SignedCorpus* corpus, SignStats* stats) {
  absl::StatusOr<std::unique_ptr<CorpusReader>> reader = open_corpus();
  if (!reader.ok()) return reader.status();
  SignOptions sign;
  sign.threads = options.threads;
  return SignCorpus(**reader, settings, sign, corpus, stats);
}

// Resolves the labels against the first signed corpus.
absl::Status ResolveOnce(const SignedCorpus& corpus, std::string_view labels_name,
                         const TuneOptions& options, TuneResult* result) {
  if (corpus.size() == 0) return absl::InvalidArgumentError("the corpus has no documents");
  result->documents = corpus.size();
  result->ids.assign(corpus.ids().begin(), corpus.ids().end());
  absl::StatusOr<std::vector<ResolvedPair>> labelled = ResolveLabels(
      result->labels, corpus.ids(), labels_name, options.skip_unknown_ids, &result->warnings);
  if (!labelled.ok()) return labelled.status();
  if (labelled->empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(std::string(labels_name), ": no labelled pair to evaluate"));
  }
  result->labelled = std::move(*labelled);
  return absl::OkStatus();
}

absl::Status EvaluateShingle(const OpenCorpus& open_corpus, uint32_t shingle_index,
                             std::string_view labels_name, Context* context) {
  const TuneOptions& options = *context->options;
  TuneResult& result = *context->result;
  const ShingleChoice choice = options.grid.shingles[shingle_index];
  if (options.progress) options.progress(absl::StrCat("signing with ", choice.ToString()));
  TuneSetting first{choice, options.grid.perms[0], {}, 0, 0, nullptr};
  SignedCorpus base(first.perms);
  SignStats stats;
  absl::Status signed_ok = SignFirst(open_corpus, first.Signature(options), options, &base, &stats);
  if (!signed_ok.ok()) return signed_ok;
  if (shingle_index == 0) {
    if (absl::Status s = ResolveOnce(base, labels_name, options, &result); !s.ok()) return s;
  } else if (base.size() != result.documents) {
    return InputChanged(
        absl::StrFormat("the corpus changed between two readings: %d documents now, %d before",
                        base.size(), result.documents));
  }
  ShingleEvaluation evaluation{choice, stats.empty_documents, options.measure, {}};
  for (const ResolvedPair& pair : result.labelled) {
    ScoredPair measured = MeasureOverlap(base.shingles(pair.a), base.shingles(pair.b));
    measured.a = pair.a;
    measured.b = pair.b;
    evaluation.labelled.push_back(measured);
  }
  result.shingles.push_back(std::move(evaluation));
  for (size_t p = 0; p < options.grid.perms.size(); ++p) {
    const uint32_t perms = options.grid.perms[p];
    const std::vector<PlannedSetting> planned = PlanSettings(options.grid, perms, options.measure);
    if (p == 0) {
      EvaluateSignature(base, shingle_index, planned, context);
    } else {
      TuneSetting setting{choice, perms, {}, 0, 0, nullptr};
      const SignedCorpus corpus = Resign(base, setting.Signature(options), options.threads);
      EvaluateSignature(corpus, shingle_index, planned, context);
    }
  }
  return absl::OkStatus();
}

}  // namespace

const SignatureEvaluation& TuneResult::SignatureOf(const TuneSetting& setting) const {
  for (const SignatureEvaluation& signing : signatures) {
    if (shingles[signing.shingle].shingle == setting.shingle && signing.perms == setting.perms) {
      return signing;
    }
  }
  return signatures.front();
}

double ShingleEvaluation::MeasureOf(size_t i) const {
  return kindred::MeasureOf(labelled[i], measure);
}

const ShingleEvaluation& TuneResult::ShinglesOf(const TuneSetting& setting) const {
  for (const ShingleEvaluation& evaluation : shingles) {
    if (evaluation.shingle == setting.shingle) return evaluation;
  }
  return shingles.front();
}

absl::StatusOr<TuneResult> RunTune(const OpenCorpus& open_corpus, std::vector<LabelledPair> labels,
                                   std::string_view labels_name, const TuneOptions& options) {
  if (absl::Status s = options.Validate(); !s.ok()) return s;
  if (labels.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(std::string(labels_name), ": no labelled pairs"));
  }
  TuneResult result;
  result.labels = std::move(labels);
  Context context{&options, &result};
  for (uint32_t s = 0; s < options.grid.shingles.size(); ++s) {
    if (absl::Status status = EvaluateShingle(open_corpus, s, labels_name, &context);
        !status.ok()) {
      return status;
    }
  }
  std::sort(result.ranking.begin(), result.ranking.end(), RanksBefore);
  result.target_met = result.recommended().meets_target;
  return result;
}

}  // namespace kindred
