// The terminal and JSON Lines forms of a tune result.
#include <algorithm>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/plural.h"
#include "kindred/records.h"
#include "kindred/tune_report.h"
#include "tune/tune_containment.h"

namespace kindred {
namespace {

uint32_t CountDuplicates(const TuneResult& result) {
  return static_cast<uint32_t>(std::count_if(result.labelled.begin(), result.labelled.end(),
                                             [](const ResolvedPair& p) { return p.duplicate; }));
}

std::string Header(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const uint32_t duplicates = CountDuplicates(r);
  return absl::StrFormat(
      "kindred tune: %s, %s (%u duplicate, %u "
      "distinct) from %s\n"
      "Grid: %s x %s x %s, %s; "
      "target: recall >= "
      "%.4g at the highest precision; F-beta with beta = %.4g; measure: %s\n\n",
      Counted(r.documents, "document"), Counted(r.labelled.size(), "labelled pair"), duplicates,
      r.labelled.size() - duplicates, input.labels_name,
      Counted(input.options->grid.shingles.size(), "shingle setting"),
      Counted(input.options->grid.perms.size(), "perm"),
      Counted(input.options->grid.thresholds.size(), "threshold"),
      Counted(r.ranking.size(), "setting"), input.options->target_recall, input.options->beta,
      MeasureName(input.options->measure));
}

std::string Recommendation(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const SettingScore& best = r.recommended();
  std::string out =
      r.target_met ? "Recommended (the cheapest setting with the target recall at the "
                     "highest precision):\n"
                   : absl::StrFormat("No setting reaches recall %.4g. Closest (highest recall):\n",
                                     input.options->target_recall);
  out += absl::StrFormat(
      "  %s\n  precision %.4f  recall %.4f  F1 %.4f  F-beta %.4f  "
      "candidates/doc %.4f  "
      "wrong pairs %u\n  %s\n\n",
      best.setting.ToString(), best.labels.precision, best.labels.recall, best.labels.f1,
      best.labels.fbeta, best.candidates_per_document, best.wrong.size(),
      SweepCommandLine(best.setting, *input.options, input.inputs));
  return out;
}

std::string RankingTable(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const size_t rows = std::min(input.table_rows, r.ranking.size());
  std::string out = absl::StrFormat(
      "Ranking (best %u of %u; * meets the target)\n%5s  %-8s %5s %8s %9s %9s "
      "%7s %7s %7s %9s "
      "%5s\n",
      rows, r.ranking.size(), "rank", "shingle", "perms", "banding", "threshold", "precision",
      "recall", "F1", "F-beta", "cand/doc", "wrong");
  for (size_t i = 0; i < rows; ++i) {
    const SettingScore& s = r.ranking[i];
    out += absl::StrFormat("%4u%s  %-8s %5u %8s %9.2f %9.4f %7.4f %7.4f %7.4f %9.4f %5u\n", i + 1,
                           s.meets_target ? "*" : " ", s.setting.shingle.ToString(),
                           s.setting.perms, s.setting.SearchName(), s.setting.threshold,
                           s.labels.precision, s.labels.recall, s.labels.f1, s.labels.fbeta,
                           s.candidates_per_document, s.wrong.size());
  }
  return out + "\n";
}

std::string WrongList(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const SettingScore& best = r.recommended();
  const ShingleEvaluation& shingles = r.ShinglesOf(best.setting);
  const SignatureEvaluation& signing = r.SignatureOf(best.setting);
  std::string out =
      absl::StrFormat("Labelled pairs the recommendation gets wrong: %u\n", best.wrong.size());
  if (best.wrong.empty()) return out + "\n";
  out += absl::StrFormat("%6s  %-9s  %7s  %8s  %-25s  %s\n", "line", "label", "exact", "estimate",
                         "reason", "a, b");
  for (uint32_t i : best.wrong) {
    const LabelledPair& label = r.labels[r.labelled[i].label];
    out +=
        absl::StrFormat("%6u  %-9s  %7.4f  %8.4f  %-25s  %s, %s\n", label.line,
                        label.duplicate ? "duplicate" : "distinct", shingles.MeasureOf(i),
                        signing.estimates[i], WrongReason(r, *input.options, i), label.a, label.b);
  }
  return out + "\n";
}

std::string HistogramText(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const SettingScore& best = r.recommended();
  const SimilarityHistogram& histogram = r.SignatureOf(best.setting).best_histogram;
  const uint64_t largest = *std::max_element(histogram.begin(), histogram.end());
  std::string out = absl::StrFormat(
      "Exact %s of all %u candidate pairs of the "
      "recommendation (threshold %.2f marked >)\n",
      MeasureName(input.options->measure), best.candidate_pairs, best.setting.threshold);
  for (size_t bin = 0; bin < histogram.size(); ++bin) {
    const size_t bar = largest == 0 ? 0 : (histogram[bin] * 40 + largest - 1) / largest;
    const bool above = bin / 20.0 + 1e-9 >= best.setting.threshold;
    out += absl::StrFormat("  %c %.2f-%.2f |%-40s %u\n", above ? '>' : ' ', bin / 20.0,
                           (bin + 1) / 20.0, std::string(bar, '#'), histogram[bin]);
  }
  return out;
}

// The fields of a setting record; a containment search (bands and rows 0)
// adds its plan's partition count.
std::vector<std::string> SettingFields(bool plan) {
  std::vector<std::string> fields = {
      "record",         "rank",           "shingle",         "k",
      "perms",          "bands",          "rows",            "threshold",
      "banding_rank",   "meets_target",   "precision",       "recall",
      "f1",             "fbeta",          "true_positives",  "false_positives",
      "false_negatives", "true_negatives", "candidate_pairs", "candidates_per_document",
      "wrong_lines"};
  if (plan) fields.push_back("partitions");
  return fields;
}

void AppendSettingRecord(const SettingScore& s, size_t rank, const TuneResult& r,
                         std::string* out) {
  RecordWriter row(RecordFormat::kJsonLines,
                   SettingFields(s.setting.plan != nullptr), out);
  row.String("setting");
  row.Number(rank);
  row.String(ShingleModeName(s.setting.shingle.mode));
  for (uint64_t value : {uint64_t{s.setting.shingle.k}, uint64_t{s.setting.perms},
                         uint64_t{s.setting.banding.bands}, uint64_t{s.setting.banding.rows}}) {
    row.Number(value);
  }
  row.Fixed(s.setting.threshold, 2);
  row.Number(s.setting.banding_rank);
  row.Bool(s.meets_target);
  for (double value : {s.labels.precision, s.labels.recall, s.labels.f1, s.labels.fbeta}) {
    row.Similarity(value);
  }
  for (uint64_t value : {uint64_t{s.labels.true_positives}, uint64_t{s.labels.false_positives},
                         uint64_t{s.labels.false_negatives}, uint64_t{s.labels.true_negatives},
                         uint64_t{s.candidate_pairs}}) {
    row.Number(value);
  }
  row.Fixed(s.candidates_per_document, 6);
  std::vector<uint64_t> lines;
  for (uint32_t wrong : s.wrong) lines.push_back(r.labels[r.labelled[wrong].label].line);
  row.NumberList(lines);
  if (s.setting.plan != nullptr) row.Number(s.setting.plan->partitions().size());
  row.EndRow();
}

void AppendWrongRecord(const TuneReportInput& input, uint32_t i, std::string* out) {
  const TuneResult& r = *input.result;
  const LabelledPair& label = r.labels[r.labelled[i].label];
  const ShingleEvaluation& shingles = r.ShinglesOf(r.recommended().setting);
  const ScoredPair& m = shingles.labelled[i];
  RecordWriter row(RecordFormat::kJsonLines,
                   {"record", "a", "b", "line", "label", "jaccard", "measure", "estimate", "reason"},
                   out);
  row.String("wrong");
  row.String(label.a);
  row.String(label.b);
  row.Number(label.line);
  row.String(label.duplicate ? "duplicate" : "distinct");
  row.Similarity(m.jaccard);
  row.Similarity(shingles.MeasureOf(i));
  row.Similarity(r.SignatureOf(r.recommended().setting).estimates[i]);
  row.String(WrongReason(r, *input.options, i));
  row.EndRow();
}

void AppendSummaryRecord(const TuneReportInput& input, std::string* out) {
  const TuneResult& r = *input.result;
  const uint32_t duplicates = CountDuplicates(r);
  RecordWriter row(RecordFormat::kJsonLines,
                   {"record", "documents", "labelled_pairs", "duplicate", "distinct", "settings",
                    "target_recall", "beta", "measure", "target_met"},
                   out);
  row.String("summary");
  for (uint64_t value : {uint64_t{r.documents}, uint64_t{r.labelled.size()}, uint64_t{duplicates},
                         uint64_t{r.labelled.size() - duplicates}, uint64_t{r.ranking.size()}}) {
    row.Number(value);
  }
  row.Fixed(input.options->target_recall, 6);
  row.Fixed(input.options->beta, 6);
  row.String(MeasureName(input.options->measure));
  row.Bool(r.target_met);
  row.EndRow();
}

}  // namespace

std::string WrongReason(const TuneResult& result, const TuneOptions& options, uint32_t i) {
  const SettingScore& best = result.recommended();
  if (!result.SignatureOf(best.setting).best_candidates[i]) {
    const ScoredPair& m = result.ShinglesOf(best.setting).labelled[i];
    if (best.setting.plan != nullptr && std::min(m.size_a, m.size_b) > 0 &&
        std::min(m.size_a, m.size_b) < options.min_contained_size) {
      return "smaller under the least size";
    }
    return "not a candidate";
  }
  return result.labelled[i].duplicate ? "below the threshold" : "at or above the threshold";
}

std::string FormatTuneText(const TuneReportInput& input) {
  const std::string plan = input.result->recommended().setting.plan != nullptr
                               ? tune_internal::ContainmentText(input)
                               : std::string();
  return Header(input) + Recommendation(input) + plan + RankingTable(input) + WrongList(input) +
         HistogramText(input);
}

std::string FormatTuneJsonLines(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  std::string out;
  AppendSummaryRecord(input, &out);
  for (size_t i = 0; i < r.ranking.size(); ++i) AppendSettingRecord(r.ranking[i], i + 1, r, &out);
  for (uint32_t i : r.recommended().wrong) AppendWrongRecord(input, i, &out);
  const SimilarityHistogram& histogram = r.SignatureOf(r.recommended().setting).best_histogram;
  RecordWriter bins(RecordFormat::kJsonLines, {"record", "from", "to", "pairs"}, &out);
  for (size_t bin = 0; bin < histogram.size(); ++bin) {
    bins.String("histogram");
    bins.Fixed(bin / 20.0, 2);
    bins.Fixed((bin + 1) / 20.0, 2);
    bins.Number(histogram[bin]);
    bins.EndRow();
  }
  if (r.recommended().setting.plan != nullptr) tune_internal::AppendContainmentRecords(input, &out);
  RecordWriter recommendation(RecordFormat::kJsonLines, {"record", "setting", "command"}, &out);
  recommendation.String("recommendation");
  recommendation.String(r.recommended().setting.ToString());
  recommendation.String(SweepCommandLine(r.recommended().setting, *input.options, input.inputs));
  recommendation.EndRow();
  return out;
}

}  // namespace kindred
