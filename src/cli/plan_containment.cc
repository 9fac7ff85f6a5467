// kindred plan --measure containment (see plan_containment.h). Formats:
//  - text: the partitions, the table of partition pairs, and the curve of a
//    few pairs (the smallest partition with each of the first six);
//  - jsonl: one JSON object per line, field "record" = settings | partition
//    | pair | curve (the curve of every pair);
//  - tsv: the pairs table with a header line.
//
// Two figures of false candidates:
//  - share<t: FP mass / t, the share of pairs proposed if the containment of
//    pairs that do not match were uniform on [0, t) (the model of the false
//    positive mass, LSH Ensemble, Zhu et al., VLDB 2016);
//  - expected false candidates (with --documents N): the documents spread
//    evenly over the partitions (equal-depth partitioning, as in the paper)
//    and every pair of them at the background containment
//    (--background-containment, the share of shingles unrelated documents
//    share by chance): pairs x P(background) at the partition bounds.
#include "cli/plan_containment.h"

#include <cmath>
#include <cstdio>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "kindred/containment_lsh.h"
#include "kindred/records.h"

namespace kindred::cli {
namespace {

constexpr size_t kTextCurves = 6;

// Document pairs between two partitions when `documents` are spread evenly
// over `partitions`.
double PairsBetween(uint64_t documents, size_t partitions, const PartitionBanding& pair) {
  const double per = static_cast<double>(documents) / static_cast<double>(partitions);
  return pair.small == pair.large ? per * (per - 1) / 2 : per * per;
}

double FalseCandidateShare(const PartitionBanding& pair, double threshold) {
  return pair.false_positive_mass / threshold;
}

std::vector<double> Containments(double threshold) {
  std::vector<double> grid;
  for (int i = 0; i <= 20; ++i) grid.push_back(i / 20.0);
  for (double extra : {threshold, RecallPoint(threshold)}) {
    bool on_grid = false;
    for (double c : grid) on_grid |= std::abs(c - extra) < 1e-9;
    if (!on_grid) grid.push_back(extra);
  }
  std::sort(grid.begin(), grid.end());
  return grid;
}

double CurveAt(const ContainmentPlan& plan, const PartitionBanding& pair, double c) {
  return ContainmentCandidateProbability(c, plan.partitions()[pair.small].lower,
                                         plan.partitions()[pair.large].upper, pair.banding);
}

void PrintText(const ContainmentPlan& plan, const ContainmentPlanRequest& r) {
  const auto& parts = plan.partitions();
  std::printf("Containment plan (LSH Ensemble) for threshold %.4g with %u perms\n", r.threshold,
              r.perms);
  std::printf("Smaller document at least %u shingles, largest %u: %zu size partitions\n",
              r.min_size, r.largest, parts.size());
  std::printf("Recall floor: %.4g at containment %.4g, at the partitions' size bounds\n\n",
              r.min_recall, RecallPoint(r.threshold));
  std::printf("partition  shingles\n");
  for (size_t k = 0; k < parts.size(); ++k) {
    std::printf("%9zu  %u-%u\n", k, parts[k].lower, parts[k].upper);
  }
  std::printf(
      "\nsmaller  larger  banding   P(t)      P(t+.05)  FN mass   FP mass   floor  "
      "share<t  %s\n",
      r.documents > 0 ? "expected false candidates" : "");
  double total = 0;
  for (const PartitionBanding& pair : plan.pairs()) {
    const std::string name = absl::StrFormat("%ux%u", pair.banding.bands, pair.banding.rows);
    std::printf("%7u  %6u  %-8s  %.6f  %.6f  %.6f  %.6f  %-5s  %.6f", pair.small, pair.large,
                name.c_str(), pair.probability_at_threshold, pair.probability_at_recall_point,
                pair.false_negative_mass, pair.false_positive_mass,
                pair.meets_recall_floor ? "met" : "NOT", FalseCandidateShare(pair, r.threshold));
    if (r.documents > 0) {
      const double expected =
          PairsBetween(r.documents, parts.size(), pair) * CurveAt(plan, pair, r.background);
      total += expected;
      std::printf("  %.0f", expected);
    }
    std::printf("\n");
  }
  if (r.documents > 0) {
    std::printf(
        "expected false candidates for %llu documents at background containment %.4g: "
        "%.0f\n",
        static_cast<unsigned long long>(r.documents), r.background, total);
  }
  std::printf(
      "\nProbability of proposing a pair by containment (smaller-larger partition, at "
      "the bounds)\ncontainment");
  std::vector<const PartitionBanding*> shown;
  for (size_t j = 0; j < parts.size() && shown.size() < kTextCurves; ++j) {
    shown.push_back(&plan.PairOf(0, static_cast<uint32_t>(j)));
    std::printf("  %8s", absl::StrFormat("0-%zu", j).c_str());
  }
  std::printf("\n");
  for (double c : Containments(r.threshold)) {
    std::printf("%11.4f", c);
    for (const PartitionBanding* pair : shown) std::printf("  %8.6f", CurveAt(plan, *pair, c));
    std::printf("\n");
  }
}

void AppendSettingsRecord(const ContainmentPlanRequest& r, std::string* out) {
  RecordWriter row(RecordFormat::kJsonLines,
                   {"record", "measure", "threshold", "perms", "min_contained_size",
                    "largest_size", "documents", "background_containment", "min_recall",
                    "recall_point"},
                   out);
  row.String("settings");
  row.String("containment");
  row.Fixed(r.threshold, 6);
  row.Number(r.perms);
  row.Number(r.min_size);
  row.Number(r.largest);
  row.Number(r.documents);
  for (double value : {r.background, r.min_recall, RecallPoint(r.threshold)}) row.Fixed(value, 6);
  row.EndRow();
}

void AppendPairRecord(const ContainmentPlan& plan, const ContainmentPlanRequest& r,
                      const PartitionBanding& pair, std::string* out) {
  RecordWriter row(RecordFormat::kJsonLines,
                   {"record", "smaller", "larger", "bands", "rows", "probability_at_threshold",
                    "probability_at_recall_point", "false_negative_mass", "false_positive_mass",
                    "meets_recall_floor", "false_candidate_share", "expected_false_candidates"},
                   out);
  row.String("pair");
  for (uint64_t value : {uint64_t{pair.small}, uint64_t{pair.large},
                         uint64_t{pair.banding.bands}, uint64_t{pair.banding.rows}}) {
    row.Number(value);
  }
  for (double value : {pair.probability_at_threshold, pair.probability_at_recall_point,
                       pair.false_negative_mass, pair.false_positive_mass}) {
    row.Fixed(value, 6);
  }
  row.Bool(pair.meets_recall_floor);
  row.Fixed(FalseCandidateShare(pair, r.threshold), 6);
  row.Fixed(PairsBetween(r.documents, plan.partitions().size(), pair) *
                CurveAt(plan, pair, r.background),
            1);
  row.EndRow();
}

void PrintJsonl(const ContainmentPlan& plan, const ContainmentPlanRequest& r) {
  std::string out;
  AppendSettingsRecord(r, &out);
  AppendPartitionRecords(plan, &out);
  for (const PartitionBanding& pair : plan.pairs()) AppendPairRecord(plan, r, pair, &out);
  RecordWriter curve(RecordFormat::kJsonLines,
                     {"record", "smaller", "larger", "containment", "probability"}, &out);
  for (const PartitionBanding& pair : plan.pairs()) {
    for (double c : Containments(r.threshold)) {
      curve.String("curve");
      curve.Number(pair.small);
      curve.Number(pair.large);
      curve.Fixed(c, 6);
      curve.Fixed(CurveAt(plan, pair, c), 6);
      curve.EndRow();
    }
  }
  std::fputs(out.c_str(), stdout);
}

void PrintTsv(const ContainmentPlan& plan, const ContainmentPlanRequest& r) {
  std::printf(
      "smaller\tlarger\tsmaller_from\tsmaller_to\tlarger_from\tlarger_to\tbands\trows\t"
      "probability_at_threshold\tprobability_at_recall_point\tfalse_negative_mass\t"
      "false_positive_mass\tmeets_recall_floor\tfalse_candidate_share\n");
  const auto& parts = plan.partitions();
  for (const PartitionBanding& pair : plan.pairs()) {
    std::printf("%u\t%u\t%u\t%u\t%u\t%u\t%u\t%u\t%.6f\t%.6f\t%.6f\t%.6f\t%s\t%.6f\n", pair.small,
                pair.large, parts[pair.small].lower, parts[pair.small].upper,
                parts[pair.large].lower, parts[pair.large].upper, pair.banding.bands,
                pair.banding.rows, pair.probability_at_threshold, pair.probability_at_recall_point,
                pair.false_negative_mass, pair.false_positive_mass,
                pair.meets_recall_floor ? "true" : "false", FalseCandidateShare(pair, r.threshold));
  }
}

}  // namespace

int RunContainmentPlan(const ContainmentPlanRequest& request) {
  if (request.min_size < 1 || request.largest < 1) {
    return Fail(kExitUsage, absl::InvalidArgumentError(
                                "--min-contained-size and --largest-size must be at least 1"));
  }
  if (!(request.background >= 0 && request.background <= 1)) {
    return Fail(kExitUsage,
                absl::InvalidArgumentError("--background-containment must be in [0, 1]"));
  }
  ContainmentPlanOptions options;
  options.threshold = request.threshold;
  options.perms = request.perms;
  options.min_size = request.min_size;
  options.largest_size = request.largest;
  options.fn_weight = request.fn_weight;
  options.fp_weight = request.fp_weight;
  options.min_recall = request.min_recall;
  const ContainmentPlan plan(options);
  if (request.format == OutputFormat::kJsonLines) {
    PrintJsonl(plan, request);
  } else if (request.format == OutputFormat::kTsv) {
    PrintTsv(plan, request);
  } else {
    PrintText(plan, request);
  }
  if (std::fflush(stdout) != 0 || std::ferror(stdout)) {
    return Fail(kExitOutput, absl::UnavailableError("cannot write the plan to standard output"));
  }
  return kExitOk;
}

}  // namespace kindred::cli
