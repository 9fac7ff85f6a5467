// The containment search of `kindred tune` (tune_containment.h).
#include "tune/tune_containment.h"

#include <algorithm>
#include <cmath>

#include "kindred/banding.h"
#include "kindred/containment_candidates.h"

namespace kindred::tune_internal {

std::shared_ptr<const ContainmentPlan> PlanFor(const SignedCorpus& corpus, double threshold,
                                               const TuneOptions& options) {
  ContainmentPlanOptions plan;  // as the sweep makes it (core/sweep.cc)
  plan.threshold = threshold;
  plan.perms = corpus.perms();
  plan.min_size = options.min_contained_size;
  return std::make_shared<const ContainmentPlan>(PlanForCorpus(corpus, plan));
}

const PartitionBanding* BandingOfPair(const ContainmentPlan& plan, uint32_t size_a,
                                      uint32_t size_b) {
  const uint32_t small = std::min(size_a, size_b);
  const uint32_t large = std::max(size_a, size_b);
  if (small == 0) return nullptr;
  const int i = plan.PartitionOf(small);
  const int j = plan.PartitionOf(large);
  if (i < 0 || j < 0) return nullptr;
  return &plan.PairOf(static_cast<uint32_t>(i), static_cast<uint32_t>(j));
}

std::vector<uint8_t> PlanLabelledCandidates(const SignedCorpus& corpus,
                                            absl::Span<const ResolvedPair> labelled,
                                            const ContainmentPlan& plan) {
  std::vector<uint8_t> candidate(labelled.size(), 0);
  std::vector<uint64_t> keys_a, keys_b;
  for (size_t i = 0; i < labelled.size(); ++i) {
    const PartitionBanding* pair = BandingOfPair(plan, corpus.shingle_count(labelled[i].a),
                                                 corpus.shingle_count(labelled[i].b));
    if (pair == nullptr) continue;
    keys_a.resize(pair->banding.bands);
    keys_b.resize(pair->banding.bands);
    BandKeys(corpus.signature(labelled[i].a), pair->banding, absl::MakeSpan(keys_a));
    BandKeys(corpus.signature(labelled[i].b), pair->banding, absl::MakeSpan(keys_b));
    for (uint32_t band = 0; band < pair->banding.bands; ++band) {
      if (keys_a[band] != kNoBandKey && keys_a[band] == keys_b[band]) candidate[i] = 1;
    }
  }
  return candidate;
}

double PlanProbability(const ContainmentPlan& plan, const ScoredPair& pair) {
  const PartitionBanding* banding = BandingOfPair(plan, pair.size_a, pair.size_b);
  if (banding == nullptr) return 0;
  return CandidateProbability(pair.jaccard, banding->banding.bands, banding->banding.rows);
}

std::vector<CandidateRateBin> CandidateRates(const TuneResult& result) {
  const SettingScore& best = result.recommended();
  const ShingleEvaluation& shingles = result.ShinglesOf(best.setting);
  const SignatureEvaluation& signing = result.SignatureOf(best.setting);
  std::vector<CandidateRateBin> bins(10);
  for (size_t b = 0; b < bins.size(); ++b) {
    bins[b].from = b / 10.0;
    bins[b].to = (b + 1) / 10.0;
  }
  for (size_t i = 0; i < result.labelled.size(); ++i) {
    const ScoredPair& m = shingles.labelled[i];
    const double scaled = std::floor(shingles.MeasureOf(i) * 10 + 1e-9);
    CandidateRateBin& bin = bins[static_cast<size_t>(std::clamp(scaled, 0.0, 9.0))];
    ++bin.pairs;
    bin.candidates += signing.best_candidates[i];
    bin.expected += PlanProbability(*best.setting.plan, m);
  }
  for (CandidateRateBin& bin : bins) {
    if (bin.pairs > 0) bin.expected /= bin.pairs;
  }
  return bins;
}

}  // namespace kindred::tune_internal
