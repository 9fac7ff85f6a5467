// kindred: presenting a tune result: the terminal report, JSON Lines records
// and a self-contained HTML report with SVG plots.
//
// The three show the same ranking (TuneResult::ranking, best first).
//  - text: the recommendation and the sweep command line that uses it, a
//    table of the best settings (setting, precision, recall, F1, F-beta,
//    candidates per document, wrong pairs), the labelled pairs the
//    recommendation gets wrong, and a text histogram of the exact similarity
//    of all its candidate pairs.
//  - JSON Lines: one object per line, field "record" = summary | setting
//    (every setting, in ranking order) | wrong (the recommendation's wrong
//    pairs) | histogram (one per bin) | recommendation.
//  - HTML: one XHTML file (it parses as XML) with inline CSS and inline SVG:
//    the S-curves of the top settings with the labelled pairs' exact
//    similarities marked, precision and recall against the threshold, the
//    candidate similarity histogram, the ranking table and, for each pair the
//    recommendation gets wrong, the explanation with shared passages marked.
//    It loads nothing: no script, no style sheet, no image, no URL.
// Numbers are printed with fixed precision, so the same result gives the
// same bytes.
//
// Pure functions of their arguments; thread-safe.
#ifndef KINDRED_TUNE_REPORT_H_
#define KINDRED_TUNE_REPORT_H_

#include <cstddef>
#include <string>
#include <vector>

#include "kindred/explain.h"
#include "kindred/tune.h"

namespace kindred {

struct TuneReportInput {
  const TuneResult* result = nullptr;    // borrowed; required
  const TuneOptions* options = nullptr;  // borrowed; required
  std::vector<std::string> inputs;       // the corpus as given (for the command line)
  std::string labels_name;               // the labels file as given
  size_t table_rows = 20;                // rows of the ranking shown (text, HTML)
  size_t curves = 4;                     // S-curves drawn (distinct perms x banding)
};

// An explained wrong pair for the HTML report.
struct ExplainedPair {
  uint32_t labelled = 0;  // index into TuneResult::labelled
  Explanation explanation;
  std::string text_a;
  std::string text_b;
};

// Why the recommendation got labelled pair `i` wrong: "not a candidate",
// "below the threshold" (a duplicate missed) or "at or above the threshold"
// (a distinct pair reported).
std::string WrongReason(const TuneResult& result, const TuneOptions& options, uint32_t i);

std::string FormatTuneText(const TuneReportInput& input);
std::string FormatTuneJsonLines(const TuneReportInput& input);
// `explained` may be empty (then the pairs are listed without passages).
std::string FormatTuneHtml(const TuneReportInput& input,
                           const std::vector<ExplainedPair>& explained);

}  // namespace kindred

#endif  // KINDRED_TUNE_REPORT_H_
