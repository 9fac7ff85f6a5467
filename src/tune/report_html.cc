// The HTML form of a tune result: one self-contained XHTML file.
#include <algorithm>
#include <set>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "kindred/tune_report.h"
#include "tune/svg.h"
#include "tune/tune_containment.h"

namespace kindred {
namespace {

using tune_internal::Axis;
using tune_internal::EscapeXml;
using tune_internal::kPalette;
using tune_internal::SvgPlot;

constexpr const char* kStyle = R"(
body { font-family: sans-serif; margin: 2em; color: #222; max-width: 1100px; }
h1 { font-size: 1.5em; } h2 { font-size: 1.2em; margin-top: 2em; }
table { border-collapse: collapse; font-size: 0.9em; }
th, td { border: 1px solid #bbb; padding: 3px 8px; text-align: right; }
th { background: #eee; } td.text { text-align: left; }
tr.chosen td { background: #fff3c4; font-weight: bold; }
pre { background: #f4f4f4; padding: 0.6em; white-space: pre-wrap; word-break: break-all; }
mark { background: #ffe08a; }
.pair { border-top: 1px solid #ccc; margin-top: 1.5em; }
.texts { display: flex; gap: 1em; } .texts pre { flex: 1; font-size: 0.85em; }
.note { color: #555; font-size: 0.9em; }
)";

std::string Cell(const std::string& text) { return absl::StrCat("<td>", text, "</td>"); }

// S-curves of the best settings (distinct perms x banding), with the
// labelled pairs of the recommendation's shingle setting marked below.
std::string SCurvePlot(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  SvgPlot plot("Candidate probability (S-curves of the top settings)",
               Axis{absl::StrCat("exact similarity (", MeasureName(input.options->measure), ")"), 0,
                    1, 0.1, 1},
               Axis{"probability of becoming a candidate", -0.2, 1, 0.2, 1});
  std::set<std::pair<uint32_t, std::pair<uint32_t, uint32_t>>> drawn;
  for (const SettingScore& s : r.ranking) {
    if (drawn.size() >= input.curves) break;
    const Banding b = s.setting.banding;
    if (!drawn.insert({s.setting.perms, {b.bands, b.rows}}).second) continue;
    std::vector<std::pair<double, double>> points;
    for (int i = 0; i <= 100; ++i)
      points.push_back({i / 100.0, CandidateProbability(i / 100.0, b.bands, b.rows)});
    const std::string color = kPalette[(drawn.size() - 1) % 6];
    plot.Line(points, color,
              absl::StrFormat("%ux%u, %u perms%s", b.bands, b.rows, s.setting.perms,
                              drawn.size() == 1 ? " (chosen)" : ""),
              drawn.size() == 1 ? "" : "6 3");
  }
  const SettingScore& best = r.recommended();
  const ShingleEvaluation& shingles = r.ShinglesOf(best.setting);
  const std::set<uint32_t> wrong(best.wrong.begin(), best.wrong.end());
  for (size_t i = 0; i < r.labelled.size(); ++i) {
    const LabelledPair& label = r.labels[r.labelled[i].label];
    const bool duplicate = label.duplicate;
    plot.Dot(
        shingles.MeasureOf(i), duplicate ? -0.07 : -0.15, duplicate ? kPalette[2] : kPalette[4],
        absl::StrFormat("%s / %s: %.4f, labelled %s%s", label.a, label.b, shingles.MeasureOf(i),
                        duplicate ? "duplicate" : "distinct", wrong.count(i) ? " (wrong)" : ""),
        wrong.count(i) > 0);
  }
  plot.DotLegend(kPalette[2],
                 absl::StrCat("labelled duplicate (", best.setting.shingle.ToString(), ")"));
  plot.DotLegend(kPalette[4], "labelled distinct");
  plot.DotLegend("#000", "ringed: wrong");
  plot.Marker(best.setting.threshold, "#444", absl::StrFormat("t=%.2f", best.setting.threshold));
  return plot.Finish();
}

// Precision and recall of the recommendation's signing and banding as the
// threshold moves.
std::string PrecisionRecallPlot(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const SettingScore& best = r.recommended();
  const ShingleEvaluation& shingles = r.ShinglesOf(best.setting);
  const SignatureEvaluation& signing = r.SignatureOf(best.setting);
  std::vector<std::pair<double, double>> precision, recall, fbeta;
  for (int i = 1; i <= 100; ++i) {
    const double t = i / 100.0;
    const LabelScore score = ScoreLabels(r.labelled, shingles.labelled, signing.best_candidates, t,
                                         input.options->measure, input.options->beta, nullptr,
                                         input.options->min_contained_size);
    precision.push_back({t, score.precision});
    recall.push_back({t, score.recall});
    fbeta.push_back({t, score.fbeta});
  }
  SvgPlot plot(absl::StrFormat("Precision and recall against the threshold (%s, %u perms, %s)",
                               best.setting.shingle.ToString(), best.setting.perms,
                               best.setting.SearchName()),
               Axis{"threshold", 0, 1, 0.1, 1}, Axis{"precision, recall", 0, 1, 0.2, 1});
  plot.Line(precision, kPalette[0], "precision");
  plot.Line(recall, kPalette[1], "recall");
  plot.Line(fbeta, kPalette[3], absl::StrFormat("F-beta (beta %.3g)", input.options->beta), "4 3");
  plot.Marker(best.setting.threshold, "#444", absl::StrFormat("t=%.2f", best.setting.threshold));
  return plot.Finish();
}

std::string HistogramPlot(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const SettingScore& best = r.recommended();
  const SimilarityHistogram& histogram = r.SignatureOf(best.setting).best_histogram;
  const uint64_t largest =
      std::max<uint64_t>(1, *std::max_element(histogram.begin(), histogram.end()));
  const double step = tune_internal::NiceStep(static_cast<double>(largest));
  SvgPlot plot(absl::StrFormat("Exact similarity of all %u candidate pairs", best.candidate_pairs),
               Axis{absl::StrCat("exact similarity (", MeasureName(input.options->measure), ")"), 0,
                    1, 0.1, 1},
               Axis{"candidate pairs", 0, std::ceil(largest / step) * step, step, 0});
  for (size_t bin = 0; bin < histogram.size(); ++bin) {
    plot.Bar(
        bin / 20.0, (bin + 1) / 20.0, static_cast<double>(histogram[bin]),
        bin / 20.0 + 1e-9 >= best.setting.threshold ? kPalette[1] : kPalette[0],
        absl::StrFormat("%.2f to %.2f: %u pairs", bin / 20.0, (bin + 1) / 20.0, histogram[bin]));
  }
  plot.DotLegend(kPalette[1], "at or above the threshold");
  plot.DotLegend(kPalette[0], "below the threshold");
  plot.Marker(best.setting.threshold, "#444", absl::StrFormat("t=%.2f", best.setting.threshold));
  return plot.Finish();
}

std::string RankingTable(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  std::string out =
      "<table>\n<tr><th>rank</th><th>shingle</th><th>perms</th><th>banding</th>"
      "<th>threshold</th><th>precision</th><th>recall</th><th>F1</"
      "th><th>F-beta</th>"
      "<th>candidates per document</th><th>wrong pairs</th><th>meets "
      "target</th></tr>\n";
  for (size_t i = 0; i < std::min(input.table_rows, r.ranking.size()); ++i) {
    const SettingScore& s = r.ranking[i];
    out += absl::StrCat(
        i == 0 ? "<tr class=\"chosen\">" : "<tr>", Cell(absl::StrCat(i + 1)),
        Cell(s.setting.shingle.ToString()), Cell(absl::StrCat(s.setting.perms)),
        Cell(s.setting.SearchName()),
        Cell(absl::StrFormat("%.2f", s.setting.threshold)),
        Cell(absl::StrFormat("%.4f", s.labels.precision)),
        Cell(absl::StrFormat("%.4f", s.labels.recall)), Cell(absl::StrFormat("%.4f", s.labels.f1)),
        Cell(absl::StrFormat("%.4f", s.labels.fbeta)),
        Cell(absl::StrFormat("%.4f", s.candidates_per_document)),
        Cell(absl::StrCat(s.wrong.size())), Cell(s.meets_target ? "yes" : "no"), "</tr>\n");
  }
  return out + "</table>\n";
}

std::string MarkedText(const std::string& text, const std::vector<TextSpan>& spans) {
  std::string out;
  size_t at = 0;
  for (const TextSpan& span : spans) {
    out += EscapeXml(std::string_view(text).substr(at, span.begin - at));
    out += absl::StrCat("<mark>",
                        EscapeXml(std::string_view(text).substr(span.begin, span.end - span.begin)),
                        "</mark>");
    at = span.end;
  }
  return out + EscapeXml(std::string_view(text).substr(std::min(at, text.size())));
}

std::string WrongPair(const TuneReportInput& input, uint32_t i, const ExplainedPair* explained) {
  const TuneResult& r = *input.result;
  const LabelledPair& label = r.labels[r.labelled[i].label];
  const ShingleEvaluation& shingles = r.ShinglesOf(r.recommended().setting);
  std::string out = absl::StrFormat(
      "<div class=\"pair\">\n<h3>%s and %s</h3>\n<p>Labelled %s (line %u); %s. "
      "Exact %s %.4f, "
      "signature estimate %.4f.</p>\n",
      EscapeXml(label.a), EscapeXml(label.b), label.duplicate ? "duplicate" : "distinct",
      label.line, WrongReason(r, *input.options, i), MeasureName(input.options->measure),
      shingles.MeasureOf(i), r.SignatureOf(r.recommended().setting).estimates[i]);
  if (explained != nullptr) {
    const Explanation& e = explained->explanation;
    const ScoredPair& o = e.measure;
    out += absl::StrFormat(
        "<p>Jaccard %.4f, containment of a in b %.4f, of b in "
        "a %.4f; shared shingles %u, only "
        "in a %u, only in b %u. Shared passages are "
        "marked.</p>\n<div class=\"texts\"><pre>%s"
        "</pre><pre>%s</pre></div>\n",
        o.jaccard, o.ContainmentOfAInB(), o.ContainmentOfBInA(), o.shared, o.size_a - o.shared,
        o.size_b - o.shared, MarkedText(explained->text_a, e.marked_a),
        MarkedText(explained->text_b, e.marked_b));
  }
  return out + "</div>\n";
}

std::string Summary(const TuneReportInput& input) {
  const TuneResult& r = *input.result;
  const SettingScore& best = r.recommended();
  return absl::StrFormat(
      "<p>%u documents; %u labelled pairs from %s; %u settings evaluated. "
      "Target: recall at "
      "least %.4g at the highest precision, then the fewest candidate pairs "
      "per document.</p>\n"
      "<h2>Recommendation</h2>\n<p>%s%s: precision %.4f, recall %.4f, F1 %.4f, "
      "F-beta %.4f "
      "(beta %.3g), %.4f candidate pairs per document, %u labelled pairs "
      "wrong.</p>\n"
      "<pre>%s</pre>\n",
      r.documents, r.labelled.size(), EscapeXml(input.labels_name), r.ranking.size(),
      input.options->target_recall,
      r.target_met ? "" : "No setting reaches the target recall; the closest is ",
      EscapeXml(best.setting.ToString()), best.labels.precision, best.labels.recall, best.labels.f1,
      best.labels.fbeta, input.options->beta, best.candidates_per_document, best.wrong.size(),
      EscapeXml(SweepCommandLine(best.setting, *input.options, input.inputs)));
}

}  // namespace

std::string FormatTuneHtml(const TuneReportInput& input,
                           const std::vector<ExplainedPair>& explained) {
  std::string out = absl::StrCat(
      "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n"
      "<title>kindred tune report</title>\n<style>",
      kStyle, "</style>\n</head>\n<body>\n<h1>kindred tune report</h1>\n", Summary(input));
  if (input.result->recommended().setting.plan != nullptr) {
    out += tune_internal::ContainmentHtml(input);
  } else {
    out += absl::StrCat("<h2>S-curves</h2>\n", SCurvePlot(input),
                        "<p class=\"note\">Dots below the axis are the labelled pairs at their "
                        "exact similarity; hover for their ids.</p>\n");
  }
  out += absl::StrCat("<h2>Precision and recall</h2>\n", PrecisionRecallPlot(input));
  out += absl::StrCat("<h2>Candidate similarity</h2>\n", HistogramPlot(input));
  out += absl::StrCat("<h2>Ranking</h2>\n", RankingTable(input));
  const SettingScore& best = input.result->recommended();
  out += absl::StrFormat("<h2>Labelled pairs the recommendation gets wrong (%u)</h2>\n",
                         best.wrong.size());
  for (uint32_t i : best.wrong) {
    const ExplainedPair* found = nullptr;
    for (const ExplainedPair& pair : explained) {
      if (pair.labelled == i) found = &pair;
    }
    out += WrongPair(input, i, found);
  }
  return out + "</body>\n</html>\n";
}

}  // namespace kindred
