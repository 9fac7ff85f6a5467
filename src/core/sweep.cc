#include "kindred/sweep.h"

#include <algorithm>
#include <chrono>

#include "core/band_spill.h"
#include "core/group_members.h"
#include "core/reload.h"
#include "kindred/signer.h"
#include "kindred/sweep_stages.h"
#include "kindred/verify.h"

namespace kindred {
namespace {

double SecondsSince(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

Banding BandingFor(const SweepOptions& options) {
  return ResolveBanding(options.match, options.signature.perms);
}
// Groups result->pairs and fills the counts of result->stats.
void GroupAndCount(const SignedCorpus& corpus, const SweepOptions& options, SweepResult* result) {
  result->groups = GroupPairs(result->pairs, corpus.all_facts(), options.keep, options.grouping,
                              std::max(1, options.sign.threads));
  SweepStats& stats = result->stats;
  stats.confirmed_pairs = result->pairs.size();
  stats.groups = result->groups.size();
  stats.drops = 0;
  for (const Group& group : result->groups) stats.drops += group.members.size() - 1;
}

// Non-empty documents under the least contained size.
uint64_t CountBelowContainedSize(const SignedCorpus& corpus, const MatchSettings& match) {
  uint64_t below = 0;
  for (size_t doc = 0; doc < corpus.size(); ++doc) {
    const uint32_t size = corpus.shingle_count(doc);
    below += size > 0 && size < match.min_contained_size;
  }
  return below;
}

// The containment search's candidates (containment_lsh.h), and its figures
// in result->stats.
std::vector<PackedPair> ContainmentCandidates(const SignedCorpus& corpus,
                                              const SweepOptions& options, SweepResult* result) {
  ContainmentPlanOptions plan_options;
  plan_options.threshold = options.match.threshold;
  plan_options.perms = corpus.perms();
  plan_options.min_size = options.match.min_contained_size;
  const ContainmentPlan plan = PlanForCorpus(corpus, plan_options);
  SweepStats& stats = result->stats;
  stats.containment_search = true;
  stats.containment_partitions = static_cast<uint32_t>(plan.partitions().size());
  stats.containment = ContainmentCandidateStats{};
  std::vector<PackedPair> candidates = FindContainmentCandidates(
      corpus, plan, std::max(1, options.sign.threads), &stats.containment, options.max_bucket);
  stats.candidates.candidate_pairs = stats.containment.candidate_pairs;
  stats.candidates.bucket_entries = stats.containment.bucket_entries;
  stats.candidates.largest_bucket = stats.containment.largest_bucket;
  stats.candidates.oversized_buckets = stats.containment.oversized_buckets;
  return candidates;
}

}  // namespace

void MatchCorpus(const SignedCorpus& corpus, const SweepOptions& options, SweepResult* result) {
  const auto start = std::chrono::steady_clock::now();
  const int threads = std::max(1, options.sign.threads);
  SweepStats& stats = result->stats;
  if (options.match.measure == Measure::kContainment) {
    stats.containment.below_min_size = CountBelowContainedSize(corpus, options.match);
  }
  if (options.exhaustive) {
    result->pairs = ExhaustivePairs(corpus, options.match, threads);
  } else if (UsesContainmentSearch(options.match)) {
    const std::vector<PackedPair> candidates = ContainmentCandidates(corpus, options, result);
    result->pairs = VerifyPairs(corpus, candidates, options.match, threads);
  } else {
    stats.banding = BandingFor(options);
    const std::vector<PackedPair> candidates =
        FindCandidatePairs(corpus, stats.banding, threads, &stats.candidates, options.max_bucket);
    result->pairs = VerifyPairs(corpus, candidates, options.match, threads);
  }
  GroupAndCount(corpus, options, result);
  stats.match_seconds = SecondsSince(start);
}

namespace {

// Whether a sweep keeps only band keys while signing and reads the
// documents of candidate pairs again (see SweepOptions::keep_sets): an LSH
// sweep by Jaccard banding, not asked to keep sets, whose inputs can all be
// read again.
bool SweepsLean(const CorpusReader& reader, const SweepOptions& options) {
  const std::vector<ResolvedInput> inputs = reader.ResolvedInputs();
  return !options.exhaustive && !options.keep_sets && !UsesContainmentSearch(options.match) &&
         std::all_of(inputs.begin(), inputs.end(), [](const ResolvedInput& input) {
           return !input.is_stdin || !input.read_path.empty();
         });
}

// The corpus a lean sweep signs into: band keys of the sweep's banding,
// spilled past half the memory budget, identical sets grouped and kept
// while they take a quarter of it (kDefaultSetMemory without a budget).
SignedCorpus LeanCorpus(const SweepOptions& options) {
  SignedCorpus corpus = SignedCorpus::Lean(options.signature.perms, BandingFor(options));
  if (options.memory > 0) {
    corpus.SetSpill(options.memory / 2, options.scratch_dir, options.file_system);
  }
  corpus.GroupIdenticalSets(options.memory > 0 ? options.memory / 4 : kDefaultSetMemory);
  return corpus;
}

// The pairs and groups of a lean corpus: candidates of the groups of
// identical sets, the sets they need read again, verification, the groups
// expanded to their members, grouping.
absl::Status MatchLeanCorpus(const CorpusReader& reader, const SweepOptions& options,
                             SweepResult* result) {
  const auto start = std::chrono::steady_clock::now();
  const int threads = std::max(1, options.sign.threads);
  SweepStats& stats = result->stats;
  SignedCorpus& corpus = result->corpus;
  stats.banding = corpus.lean_banding();
  if (const BandSpill* spill = corpus.spill(); spill != nullptr) {
    stats.spilled_bytes = spill->bytes_written();
    stats.spill_runs = spill->runs();
  }
  absl::StatusOr<GroupedCandidates> candidates = FindGroupedCandidatePairs(
      corpus, stats.banding, threads, &stats.candidates, options.max_bucket);
  if (!candidates.ok()) return candidates.status();
  if (absl::Status status = ReloadShingles(reader.ResolvedInputs(), reader.options(),
                                           options.signature,
                                           RepresentativesToRead(corpus, candidates->pairs),
                                           threads, &corpus);
      !status.ok()) {
    return status;
  }
  result->pairs = VerifyPairs(corpus, candidates->pairs, options.match, threads);
  if (!candidates->expanded) {
    result->pairs =
        ExpandGroups(corpus, GroupMembers(corpus), result->pairs, options.match, threads);
  }
  GroupAndCount(corpus, options, result);
  stats.match_seconds = SecondsSince(start);
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<SweepResult> RunSweep(CorpusReader& reader, const SweepOptions& options) {
  if (absl::Status status = options.signature.Validate(); !status.ok()) return status;
  if (absl::Status status = options.match.Validate(options.signature); !status.ok()) {
    return status;
  }
  const bool lean = SweepsLean(reader, options);
  SweepResult result(options.signature.perms);
  if (lean) result.corpus = LeanCorpus(options);
  const auto start = std::chrono::steady_clock::now();
  if (absl::Status status =
          SignCorpus(reader, options.signature, options.sign, &result.corpus, &result.stats.sign);
      !status.ok()) {
    return status;
  }
  result.stats.sign_seconds = SecondsSince(start);
  if (!lean) {
    MatchCorpus(result.corpus, options, &result);
  } else if (absl::Status status = MatchLeanCorpus(reader, options, &result); !status.ok()) {
    return status;
  }
  return result;
}

bool UsesContainmentSearch(const MatchSettings& match) {
  return match.measure == Measure::kContainment && match.bands == 0;
}

}  // namespace kindred
