// Internal: the containment search of `kindred tune` (see tune.h): the
// plan of a (signing, threshold), whether each labelled pair is one of its
// candidates, the probability the plan gives a pair of known sizes, and the
// candidate rate of the labelled pairs by containment.
//
// Pure functions; thread-safe.
#ifndef KINDRED_TUNE_TUNE_CONTAINMENT_H_
#define KINDRED_TUNE_TUNE_CONTAINMENT_H_

#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "absl/types/span.h"
#include "kindred/containment_lsh.h"
#include "kindred/labels.h"
#include "kindred/signed_corpus.h"
#include "kindred/tune.h"
#include "kindred/tune_report.h"

namespace kindred::tune_internal {

// The plan `sweep --measure containment` uses for `corpus` at `threshold`.
std::shared_ptr<const ContainmentPlan> PlanFor(const SignedCorpus& corpus, double threshold,
                                               const TuneOptions& options);

// The banding of a pair of sets of sizes a and b under `plan`, or null when
// the smaller is empty or under the plan's least size (no candidate then).
const PartitionBanding* BandingOfPair(const ContainmentPlan& plan, uint32_t size_a,
                                      uint32_t size_b);

// Whether each labelled pair is a candidate of the plan: the smaller set
// big enough and one band of its partitions' banding equal.
std::vector<uint8_t> PlanLabelledCandidates(const SignedCorpus& corpus,
                                            absl::Span<const ResolvedPair> labelled,
                                            const ContainmentPlan& plan);

// The probability the plan proposes a pair of these exact figures:
// 1 - (1 - J^r)^b with J the pair's exact Jaccard (the agreement
// probability of one MinHash slot, Broder 1997) and b x r the banding of its
// partitions; 0 when BandingOfPair is null.
double PlanProbability(const ContainmentPlan& plan, const ScoredPair& pair);

// The labelled pairs in one containment bin [from, to) (the last bin also
// holds 1), how many are candidates, and the mean probability the plan
// gives them (the expected candidate rate).
struct CandidateRateBin {
  double from = 0;
  double to = 0;
  uint32_t pairs = 0;
  uint32_t candidates = 0;
  double expected = 0;
};

// Ten bins of width 0.1 over the labelled pairs of the recommendation
// (result.recommended() must be a containment search).
std::vector<CandidateRateBin> CandidateRates(const TuneResult& result);

// The report pieces of a containment recommendation (tune_report.h):
// its plan (partitions, the banding of each pair of partitions with P(t)
// at the bounds and whether the recall floor is met) and the candidate
// rate of the labelled pairs by containment, observed and expected.
std::string ContainmentText(const TuneReportInput& input);
// JSON Lines records "partition", "partition_pair" and "candidate_rate".
void AppendContainmentRecords(const TuneReportInput& input, std::string* out);
// The same as two XHTML tables and a plot of the partition curves.
std::string ContainmentHtml(const TuneReportInput& input);

}  // namespace kindred::tune_internal

#endif  // KINDRED_TUNE_TUNE_CONTAINMENT_H_
