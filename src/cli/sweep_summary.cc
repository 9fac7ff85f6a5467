// The summary of kindred sweep on stderr.
#include <cstdio>

#include "absl/strings/str_format.h"
#include "cli/sweep_flags.h"
#include "core/plural.h"

namespace kindred::cli {
namespace {

unsigned long long Count(uint64_t n) { return static_cast<unsigned long long>(n); }

// How the candidate pairs were found, and what limited them.
void PrintCandidates(const SweepStats& stats, const SweepOptions& options) {
  if (options.exhaustive) {
    std::fprintf(stderr, "  candidate pairs   all (exhaustive comparison)\n");
  } else if (stats.containment_search) {
    std::fprintf(stderr,
                 "  candidate pairs   %llu (containment LSH: %u size partitions, %llu bandings)\n",
                 Count(stats.candidates.candidate_pairs), stats.containment_partitions,
                 Count(stats.containment.bandings));
  } else {
    std::fprintf(stderr, "  candidate pairs   %llu (%s)\n", Count(stats.candidates.candidate_pairs),
                 BandsByRows(stats.banding.bands, stats.banding.rows).c_str());
  }
  if (!options.exhaustive && stats.candidates.oversized_buckets > 0) {
    std::fprintf(stderr,
                 "  crowded buckets   %llu over %llu documents (largest %llu): members paired "
                 "with the first only (--max-bucket)\n",
                 Count(stats.candidates.oversized_buckets), Count(options.max_bucket),
                 Count(stats.candidates.largest_bucket));
  }
  if (options.match.measure == Measure::kContainment && stats.containment.below_min_size > 0) {
    std::fprintf(stderr,
                 "  small documents   %llu under %u shingles: in no containment pair "
                 "(--min-contained-size)\n",
                 Count(stats.containment.below_min_size), options.match.min_contained_size);
  }
  if (stats.spill_runs > 0) {
    std::fprintf(stderr, "  spilled           %.1f MB of band keys in %s (--memory %s)\n",
                 static_cast<double>(stats.spilled_bytes) / 1e6,
                 Counted(stats.spill_runs, "run").c_str(),
                 absl::StrFormat("%.0fM", static_cast<double>(options.memory) / (1 << 20)).c_str());
  }
}

// Confirmed pairs, groups and drops, and the documents the keep policy
// could not rank.
void PrintGroups(const SweepResult& result, const SweepOptions& options) {
  const SweepStats& stats = result.stats;
  std::fprintf(stderr, "  confirmed pairs   %llu (%s >= %g)\n", Count(stats.confirmed_pairs),
               MeasureName(options.match.measure), options.match.threshold);
  std::fprintf(
      stderr, "  groups            %llu%s\n", Count(stats.groups),
      options.grouping == Grouping::kKeepers ? " (around keepers: --grouping keepers)" : "");
  std::fprintf(stderr, "  drops             %llu (keep policy: %s)\n", Count(stats.drops),
               KeepPolicyName(options.keep));
  if (options.keep != KeepPolicy::kPriority) return;
  uint64_t without = 0;
  for (const KeepFacts& facts : result.corpus.all_facts()) without += !facts.has_priority;
  if (without > 0) {
    std::fprintf(stderr,
                 "  no priority       %llu of %llu documents lack the priority field "
                 "(they rank lowest)\n",
                 Count(without), Count(result.corpus.size()));
  }
}

}  // namespace

void PrintSweepSummary(const SweepResult& result, const SweepOptions& options) {
  const SweepStats& stats = result.stats;
  std::fprintf(stderr, "kindred sweep: %s (%llu empty)",
               Counted(stats.sign.documents, "document").c_str(),
               Count(stats.sign.empty_documents));
  if (stats.sign.bytes > 0) {
    std::fprintf(stderr, ", %.1f MB", static_cast<double>(stats.sign.bytes) / 1e6);
  }
  std::fprintf(stderr, "\n");
  PrintCandidates(stats, options);
  PrintGroups(result, options);
  if (stats.sign.invalid_utf8_documents > 0) {
    std::fprintf(stderr, "  invalid UTF-8     %s, bytes replaced by U+FFFD (-v names them)\n",
                 Counted(stats.sign.invalid_utf8_documents, "document").c_str());
  }
}

}  // namespace kindred::cli
