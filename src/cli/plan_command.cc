// kindred plan: band/row arithmetic for a threshold and a signature length.
//
// Prints the S-curve (candidate probability by similarity) of the automatic
// choice and the next alternatives, the table of alternatives best first, and
// the choice with the options that select it. Formats:
//  - text: aligned tables for people;
//  - jsonl: one JSON object per line, field "record" = settings | curve |
//    alternative | choice | given;
//  - tsv, csv: three tab- (comma-) separated tables (curve, alternatives,
//    choice), each with a header line, separated by one empty line.
#include <cmath>
#include <cstdio>
#include <optional>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_join.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/usage.h"
#include "core/plural.h"
#include "cli/plan_containment.h"
#include "kindred/banding.h"
#include "kindred/records.h"
#include "kindred/settings.h"

namespace kindred::cli {
namespace {

struct PlanOptions {
  double threshold = 0.8;
  uint32_t perms = 128;
  double fn_weight = kDefaultFalseNegativeWeight;
  double fp_weight = kDefaultFalsePositiveWeight;
  double min_recall = kDefaultMinRecall;
  uint32_t bands = 0;
  uint32_t rows = 0;
  uint32_t alternatives = 10;
  std::string format = "text";
  std::string measure = "jaccard";
  uint32_t min_contained_size = kDefaultMinContainedSize;
  uint32_t largest_size = 100000;
  uint64_t documents = 0;
  double background_containment = 0.02;
};

// Curves shown beside the chosen one.
constexpr size_t kCurveAlternatives = 3;

struct Plan {
  PlanOptions options;
  std::vector<BandingCost> ranked;  // every banding, best first
  std::vector<BandingCost> curves;  // the S-curve columns
  std::vector<double> similarities;
  bool has_given = false;
  BandingCost given;
  size_t given_rank = 0;  // 1-based rank of the given banding
};

absl::Status Validate(const PlanOptions& o) {
  SignatureSettings signature;
  signature.perms = o.perms;
  if (absl::Status s = signature.Validate(); !s.ok()) return s;
  MatchSettings match;
  match.threshold = o.threshold;
  match.bands = o.bands;
  match.rows = o.rows;
  if (absl::Status s = match.Validate(signature); !s.ok()) return s;
  if (!(o.fn_weight >= 0 && std::isfinite(o.fn_weight)) ||
      !(o.fp_weight >= 0 && std::isfinite(o.fp_weight))) {
    return absl::InvalidArgumentError("weights must be finite and >= 0");
  }
  if (!(o.min_recall >= 0 && o.min_recall <= 1)) {
    return absl::InvalidArgumentError(
        absl::StrFormat("minimum recall %g is out of range [0, 1]", o.min_recall));
  }
  if (o.alternatives < 1) return absl::InvalidArgumentError("alternatives must be >= 1");
  return absl::OkStatus();
}

// 0.00, 0.05, ..., 1.00, plus the threshold and the recall point when they
// fall between grid points.
std::vector<double> Similarities(double threshold) {
  std::vector<double> grid;
  for (int i = 0; i <= 20; ++i) grid.push_back(i / 20.0);
  for (double extra : {threshold, RecallPoint(threshold)}) {
    bool on_grid = false;
    for (double s : grid) on_grid |= std::abs(s - extra) < 1e-9;
    if (!on_grid) grid.push_back(extra);
  }
  std::sort(grid.begin(), grid.end());
  return grid;
}

Plan MakePlan(const PlanOptions& o) {
  Plan plan;
  plan.options = o;
  plan.ranked = RankBandings(o.threshold, o.perms, o.fn_weight, o.fp_weight, o.min_recall);
  plan.similarities = Similarities(o.threshold);
  if (o.bands != 0) {
    plan.has_given = true;
    const Banding given{o.bands, o.rows};
    for (size_t i = 0; i < plan.ranked.size(); ++i) {
      if (plan.ranked[i].banding == given) {
        plan.given = plan.ranked[i];
        plan.given_rank = i + 1;
      }
    }
    plan.curves.push_back(plan.given);
  }
  for (const BandingCost& cost : plan.ranked) {
    if (plan.curves.size() >= kCurveAlternatives + 1 + (plan.has_given ? 1 : 0)) break;
    if (plan.has_given && cost.banding == plan.given.banding) continue;
    plan.curves.push_back(cost);
  }
  return plan;
}

std::string Name(Banding b) { return absl::StrFormat("%ux%u", b.bands, b.rows); }

std::string CurveLabel(const Plan& plan, size_t column) {
  std::string label = Name(plan.curves[column].banding);
  if (plan.has_given && column == 0) return label + " (given)";
  if (column == (plan.has_given ? 1 : 0)) return label + " (chosen)";
  return label;
}

// Rows of the alternatives table: the best `alternatives`, plus the given
// banding when it ranks below them.
std::vector<std::pair<size_t, const BandingCost*>> TableRows(const Plan& plan) {
  std::vector<std::pair<size_t, const BandingCost*>> rows;
  const size_t shown = std::min<size_t>(plan.options.alternatives, plan.ranked.size());
  for (size_t i = 0; i < shown; ++i) rows.push_back({i + 1, &plan.ranked[i]});
  if (plan.has_given && plan.given_rank > shown) {
    rows.push_back({plan.given_rank, &plan.given});
  }
  return rows;
}

void PrintTextHeader(const Plan& plan) {
  const PlanOptions& o = plan.options;
  std::printf("Banding plan for threshold %.4g with %u perms\n", o.threshold, o.perms);
  std::printf("Weights: missed pair %.4g, false candidate %.4g. ", o.fn_weight, o.fp_weight);
  std::printf("Recall floor: %.4g at similarity %.4g\n\n", o.min_recall, RecallPoint(o.threshold));
}

void PrintTextCurves(const Plan& plan) {
  std::printf("Candidate probability by similarity (S-curve, bands x rows)\n");
  std::string header = absl::StrFormat("%10s", "similarity");
  for (size_t c = 0; c < plan.curves.size(); ++c) {
    header += absl::StrFormat("  %16s", CurveLabel(plan, c));
  }
  std::printf("%s\n", header.c_str());
  const double threshold = plan.options.threshold;
  const double recall_point = RecallPoint(threshold);
  for (double s : plan.similarities) {
    std::string line = absl::StrFormat("%10.4f", s);
    for (const BandingCost& cost : plan.curves) {
      line += absl::StrFormat("  %16.4f",
                              CandidateProbability(s, cost.banding.bands, cost.banding.rows));
    }
    if (std::abs(s - threshold) < 1e-9) line += "  <- threshold";
    if (std::abs(s - recall_point) < 1e-9 && recall_point != threshold) {
      line += "  <- recall point";
    }
    std::printf("%s\n", line.c_str());
  }
  std::printf("\n");
}

void PrintTextAlternatives(const Plan& plan) {
  std::printf(
      "Alternatives, best first (missed and false candidate masses are "
      "areas under\n"
      "the S-curve above and below the threshold)\n");
  std::printf("%5s %6s %5s %6s %13s %16s %12s %21s %14s %12s\n", "rank", "bands", "rows", "slots",
              "P(threshold)", "P(recall point)", "missed mass", "false candidate mass",
              "weighted cost", "meets floor");
  for (const auto& [rank, cost] : TableRows(plan)) {
    std::printf("%5zu %6u %5u %6llu %13.4f %16.4f %12.5f %21.5f %14.5f %12s\n", rank,
                cost->banding.bands, cost->banding.rows,
                static_cast<unsigned long long>(cost->banding.slots()),
                cost->probability_at_threshold, cost->probability_at_recall_point,
                cost->false_negative_mass, cost->false_positive_mass, cost->weighted,
                cost->meets_recall_floor ? "yes" : "no");
  }
  std::printf("\n");
}

void PrintTextChoice(const Plan& plan) {
  const BandingCost& best = plan.ranked.front();
  std::printf("Choice: %s (%llu of %u slots)%s\n",
              BandsByRows(best.banding.bands, best.banding.rows).c_str(),
              static_cast<unsigned long long>(best.banding.slots()),
              plan.options.perms,
              best.meets_recall_floor ? "" : "; no setting meets the recall floor");
  if (plan.has_given) {
    std::printf("Given: %s ranks %zu of %zu\n",
                BandsByRows(plan.given.banding.bands, plan.given.banding.rows).c_str(),
                plan.given_rank, plan.ranked.size());
  }
  std::printf("Use it with: --bands %u --rows %u\n", best.banding.bands, best.banding.rows);
}

// The fields of one banding's costs, after `record` and `rank` (when set).
void AppendCostRecord(const char* record, std::optional<size_t> rank, const BandingCost& c,
                      std::string* out) {
  std::vector<std::string> columns = {"record"};
  if (rank.has_value()) columns.push_back("rank");
  columns.insert(columns.end(),
                 {"bands", "rows", "slots", "probability_at_threshold",
                  "probability_at_recall_point", "false_negative_mass", "false_positive_mass",
                  "weighted_cost", "meets_recall_floor"});
  RecordWriter row(RecordFormat::kJsonLines, std::move(columns), out);
  row.String(record);
  if (rank.has_value()) row.Number(*rank);
  row.Number(c.banding.bands);
  row.Number(c.banding.rows);
  row.Number(c.banding.slots());
  for (double value : {c.probability_at_threshold, c.probability_at_recall_point,
                       c.false_negative_mass, c.false_positive_mass, c.weighted}) {
    row.Fixed(value, 6);
  }
  row.Bool(c.meets_recall_floor);
  row.EndRow();
}

void AppendSettingsRecord(const PlanOptions& o, std::string* out) {
  RecordWriter row(RecordFormat::kJsonLines,
                   {"record", "threshold", "perms", "fn_weight", "fp_weight", "min_recall",
                    "recall_point"},
                   out);
  row.String("settings");
  row.Fixed(o.threshold, 6);
  row.Number(o.perms);
  for (double value : {o.fn_weight, o.fp_weight, o.min_recall, RecallPoint(o.threshold)}) {
    row.Fixed(value, 6);
  }
  row.EndRow();
}

void PrintJsonl(const Plan& plan) {
  std::string out;
  AppendSettingsRecord(plan.options, &out);
  RecordWriter curve(RecordFormat::kJsonLines,
                     {"record", "bands", "rows", "similarity", "probability"}, &out);
  for (const BandingCost& cost : plan.curves) {
    for (double s : plan.similarities) {
      curve.String("curve");
      curve.Number(cost.banding.bands);
      curve.Number(cost.banding.rows);
      curve.Fixed(s, 6);
      curve.Fixed(CandidateProbability(s, cost.banding.bands, cost.banding.rows), 6);
      curve.EndRow();
    }
  }
  for (const auto& [rank, cost] : TableRows(plan)) {
    AppendCostRecord("alternative", rank, *cost, &out);
  }
  if (plan.has_given) AppendCostRecord("given", plan.given_rank, plan.given, &out);
  AppendCostRecord("choice", std::nullopt, plan.ranked.front(), &out);
  std::fputs(out.c_str(), stdout);
}

// The three tables separated by `sep` (tab or comma). Every field is a
// number, a banding name such as "8x16" or yes/no: nothing needs quoting.
void PrintDelimited(const Plan& plan, char sep) {
  const std::string s1(1, sep);
  std::vector<std::string> header = {"similarity"};
  for (const BandingCost& c : plan.curves) header.push_back(Name(c.banding));
  std::printf("%s\n", absl::StrJoin(header, s1).c_str());
  for (double s : plan.similarities) {
    std::string line = absl::StrFormat("%.4f", s);
    for (const BandingCost& c : plan.curves) {
      absl::StrAppend(
          &line,
          absl::StrFormat("%c%.6f", sep, CandidateProbability(s, c.banding.bands, c.banding.rows)));
    }
    std::printf("%s\n", line.c_str());
  }
  const std::vector<std::string> columns = {"rank",
                                            "bands",
                                            "rows",
                                            "slots",
                                            "probability_at_threshold",
                                            "probability_at_recall_point",
                                            "false_negative_mass",
                                            "false_positive_mass",
                                            "weighted_cost",
                                            "meets_recall_floor"};
  std::printf("\n%s\n", absl::StrJoin(columns, s1).c_str());
  for (const auto& [rank, c] : TableRows(plan)) {
    std::printf("%zu%c%u%c%u%c%llu%c%.6f%c%.6f%c%.6f%c%.6f%c%.6f%c%s\n", rank, sep,
                c->banding.bands, sep, c->banding.rows, sep,
                static_cast<unsigned long long>(c->banding.slots()), sep,
                c->probability_at_threshold, sep, c->probability_at_recall_point, sep,
                c->false_negative_mass, sep, c->false_positive_mass, sep, c->weighted, sep,
                c->meets_recall_floor ? "yes" : "no");
  }
  const Banding best = plan.ranked.front().banding;
  std::printf("\nbands%crows\n%u%c%u\n", sep, best.bands, sep, best.rows);
}

int RunPlan(const PlanOptions& options) {
  if (absl::Status status = Validate(options); !status.ok()) return Fail(kExitUsage, status);
  absl::StatusOr<Measure> measure = ParseMeasure(options.measure);
  if (!measure.ok()) return Fail(kExitUsage, AsOptionError(measure.status()));
  absl::StatusOr<OutputFormat> format = ParseOutputFormat(options.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  if (*measure == Measure::kContainment) {
    if (options.bands != 0) {
      return Fail(kExitUsage, absl::InvalidArgumentError(
                                  "--bands and --rows apply to --measure jaccard: a containment "
                                  "plan chooses a banding per pair of size partitions"));
    }
    if (*format == OutputFormat::kCsv) {
      return Fail(kExitUsage, absl::InvalidArgumentError(
                                  "plan: --measure containment prints text, jsonl or tsv"));
    }
    return RunContainmentPlan({options.threshold, options.perms, options.fn_weight,
                               options.fp_weight, options.min_recall, options.min_contained_size,
                               options.largest_size, options.documents,
                               options.background_containment, *format});
  }
  const Plan plan = MakePlan(options);
  if (*format == OutputFormat::kJsonLines) {
    PrintJsonl(plan);
  } else if (*format == OutputFormat::kTsv || *format == OutputFormat::kCsv) {
    PrintDelimited(plan, *format == OutputFormat::kTsv ? '\t' : ',');
  } else {
    PrintTextHeader(plan);
    PrintTextCurves(plan);
    PrintTextAlternatives(plan);
    PrintTextChoice(plan);
  }
  if (std::fflush(stdout) != 0 || std::ferror(stdout)) {
    return Fail(kExitOutput, absl::UnavailableError("cannot write the plan to standard output"));
  }
  return kExitOk;
}

}  // namespace

void RegisterPlan(CLI::App& app, int* exit_code) {
  auto options = std::make_shared<PlanOptions>();
  CLI::App* plan = app.add_subcommand("plan",
                                      "Band/row arithmetic: the S-curve and the "
                                      "expected missed and false candidate "
                                      "pairs for a threshold and signature length");
  plan->add_option("--threshold", options->threshold, "Similarity threshold, in (0, 1]")
      ->capture_default_str();
  plan->add_option("--perms", options->perms, "Signature length (slots), 1..4096")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->capture_default_str();
  plan->add_option("--fn-weight", options->fn_weight,
                   "Weight of the missed-pair mass above the threshold")
      ->capture_default_str();
  plan->add_option("--fp-weight", options->fp_weight,
                   "Weight of the false-candidate mass below the threshold")
      ->capture_default_str();
  plan->add_option("--min-recall", options->min_recall,
                   "Recall floor at min(threshold + 0.05, (threshold + 1) / "
                   "2); 0 disables it")
      ->capture_default_str();
  plan->add_option("--bands", options->bands, "Show this band count (with --rows)")
      ->transform(WholeNumber(0, UINT32_MAX));
  plan->add_option("--rows", options->rows, "Show this row count (with --bands)")
      ->transform(WholeNumber(0, UINT32_MAX));
  plan->add_option("--alternatives", options->alternatives, "Rows in the alternatives table")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->capture_default_str();
  plan->add_option("--measure", options->measure,
                   "jaccard (one banding) or containment (a banding per pair of size partitions)")
      ->check(CLI::IsMember({"jaccard", "containment"}))
      ->capture_default_str();
  plan->add_option("--min-contained-size", options->min_contained_size,
                   "containment: the least size of the smaller document, in shingles")
      ->capture_default_str();
  plan->add_option("--largest-size", options->largest_size,
                   "containment: the largest document to plan for, in shingles")
      ->capture_default_str();
  plan->add_option("--documents", options->documents,
                   "containment: corpus size for the expected false candidates (0: not shown)")
      ->capture_default_str();
  plan->add_option("--background-containment", options->background_containment,
                   "containment: the share of shingles unrelated documents share by chance, "
                   "for the expected false candidates")
      ->capture_default_str();
  AddFormatOption(plan, &options->format, {"text", "jsonl", "tsv", "csv"});
  plan->callback([options, exit_code] { *exit_code = RunPlan(*options); });
}

}  // namespace kindred::cli
