// The containment pieces of the tune report (tune_containment.h): the plan
// of the recommendation and the candidate rate of the labelled pairs by
// containment, as text, JSON Lines records and XHTML.
#include <string>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "kindred/records.h"
#include "tune/svg.h"
#include "tune/tune_containment.h"

namespace kindred::tune_internal {
namespace {

// Curves drawn in the HTML plot: the smallest partition with the first few.
constexpr size_t kCurves = 6;

const ContainmentPlan& PlanOf(const TuneReportInput& input) {
  return *input.result->recommended().setting.plan;
}

std::string BandingText(const Banding& banding) {
  return absl::StrFormat("%ux%u", banding.bands, banding.rows);
}

double CurveAt(const ContainmentPlan& plan, const PartitionBanding& pair, double c) {
  return ContainmentCandidateProbability(c, plan.partitions()[pair.small].lower,
                                         plan.partitions()[pair.large].upper, pair.banding);
}

std::string Rate(uint32_t candidates, uint32_t pairs) {
  return pairs == 0 ? "-" : absl::StrFormat("%.4f", static_cast<double>(candidates) / pairs);
}

}  // namespace

std::string ContainmentText(const TuneReportInput& input) {
  const ContainmentPlan& plan = PlanOf(input);
  const auto& parts = plan.partitions();
  std::string out = absl::StrFormat(
      "Containment plan of the recommendation (LSH Ensemble): %u size partitions, the smaller "
      "document at least %u shingles; recall floor %.4g at containment %.4g\n"
      "partition  shingles\n",
      parts.size(), plan.options().min_size, plan.options().min_recall,
      RecallPoint(plan.options().threshold));
  for (size_t k = 0; k < parts.size(); ++k) {
    out += absl::StrFormat("%9u  %u-%u\n", k, parts[k].lower, parts[k].upper);
  }
  out += absl::StrFormat("%7s  %6s  %-8s  %-8s  %s\n", "smaller", "larger", "banding", "P(t)",
                         "floor");
  for (const PartitionBanding& pair : plan.pairs()) {
    out += absl::StrFormat("%7u  %6u  %-8s  %.6f  %s\n", pair.small, pair.large,
                           BandingText(pair.banding), pair.probability_at_threshold,
                           pair.meets_recall_floor ? "met" : "NOT");
  }
  out +=
      "\nCandidate rate of the labelled pairs by containment (recommendation; expected: the "
      "plan's probability at each pair's sizes)\n";
  out += absl::StrFormat("%11s  %5s  %10s  %8s  %8s\n", "containment", "pairs", "candidates",
                         "observed", "expected");
  for (const CandidateRateBin& bin : CandidateRates(*input.result)) {
    out += absl::StrFormat("  %.1f-%.1f    %5u  %10u  %8s  %8s\n", bin.from, bin.to, bin.pairs,
                           bin.candidates, Rate(bin.candidates, bin.pairs),
                           bin.pairs == 0 ? "-" : absl::StrFormat("%.4f", bin.expected));
  }
  return out + "\n";
}

void AppendContainmentRecords(const TuneReportInput& input, std::string* out) {
  const ContainmentPlan& plan = PlanOf(input);
  AppendPartitionRecords(plan, out);
  RecordWriter pairs(RecordFormat::kJsonLines,
                     {"record", "smaller", "larger", "bands", "rows", "probability_at_threshold",
                      "probability_at_recall_point", "meets_recall_floor"},
                     out);
  for (const PartitionBanding& pair : plan.pairs()) {
    pairs.String("partition_pair");
    for (uint64_t value : {uint64_t{pair.small}, uint64_t{pair.large},
                           uint64_t{pair.banding.bands}, uint64_t{pair.banding.rows}}) {
      pairs.Number(value);
    }
    pairs.Fixed(pair.probability_at_threshold, 6);
    pairs.Fixed(pair.probability_at_recall_point, 6);
    pairs.Bool(pair.meets_recall_floor);
    pairs.EndRow();
  }
  RecordWriter rates(RecordFormat::kJsonLines,
                     {"record", "from", "to", "pairs", "candidates", "observed", "expected"}, out);
  for (const CandidateRateBin& bin : CandidateRates(*input.result)) {
    rates.String("candidate_rate");
    rates.Fixed(bin.from, 1);
    rates.Fixed(bin.to, 1);
    rates.Number(bin.pairs);
    rates.Number(bin.candidates);
    rates.Fixed(bin.pairs == 0 ? 0 : static_cast<double>(bin.candidates) / bin.pairs, 6);
    rates.Fixed(bin.expected, 6);
    rates.EndRow();
  }
}

std::string ContainmentHtml(const TuneReportInput& input) {
  const ContainmentPlan& plan = PlanOf(input);
  const auto& parts = plan.partitions();
  SvgPlot plot("Probability of proposing a pair by containment (recommended plan, at the "
               "partitions' size bounds)",
               Axis{"containment of the smaller document", 0, 1, 0.1, 1},
               Axis{"probability of becoming a candidate", 0, 1, 0.2, 1});
  for (size_t j = 0; j < parts.size() && j < kCurves; ++j) {
    const PartitionBanding& pair = plan.PairOf(0, static_cast<uint32_t>(j));
    std::vector<std::pair<double, double>> points;
    for (int i = 0; i <= 100; ++i) points.push_back({i / 100.0, CurveAt(plan, pair, i / 100.0)});
    plot.Line(points, kPalette[j % 6],
              absl::StrFormat("%u-%u shingles in %u-%u, %s", parts[0].lower, parts[0].upper,
                              parts[j].lower, parts[j].upper, BandingText(pair.banding)),
              j == 0 ? "" : "6 3");
  }
  plot.Marker(plan.options().threshold, "#444",
              absl::StrFormat("t=%.2f", plan.options().threshold));
  std::string out = absl::StrCat("<h2>Containment plan (LSH Ensemble)</h2>\n", plot.Finish());
  out += absl::StrFormat(
      "<p>%u size partitions; the smaller document at least %u shingles.</p>\n<table>\n"
      "<tr><th>smaller</th><th>larger</th><th>shingles</th><th>banding</th><th>P(t)</th>"
      "<th>recall floor</th></tr>\n",
      parts.size(), plan.options().min_size);
  for (const PartitionBanding& pair : plan.pairs()) {
    out += absl::StrFormat(
        "<tr><td>%u</td><td>%u</td><td>%u-%u in %u-%u</td><td>%s</td><td>%.6f</td><td>%s</td>"
        "</tr>\n",
        pair.small, pair.large, parts[pair.small].lower, parts[pair.small].upper,
        parts[pair.large].lower, parts[pair.large].upper, BandingText(pair.banding),
        pair.probability_at_threshold, pair.meets_recall_floor ? "met" : "NOT met");
  }
  out +=
      "</table>\n<h2>Candidate rate of the labelled pairs by containment</h2>\n<table>\n"
      "<tr><th>containment</th><th>pairs</th><th>candidates</th><th>observed rate</th>"
      "<th>expected rate</th></tr>\n";
  for (const CandidateRateBin& bin : CandidateRates(*input.result)) {
    out += absl::StrFormat(
        "<tr><td>%.1f-%.1f</td><td>%u</td><td>%u</td><td>%s</td><td>%s</td></tr>\n", bin.from,
        bin.to, bin.pairs, bin.candidates, Rate(bin.candidates, bin.pairs),
        bin.pairs == 0 ? "-" : absl::StrFormat("%.4f", bin.expected));
  }
  return out +
         "</table>\n<p class=\"note\">Expected: the mean of the plan's probability at each "
         "pair's exact sizes and Jaccard similarity.</p>\n";
}

}  // namespace kindred::tune_internal
