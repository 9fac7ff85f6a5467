// kindred tune: evaluate a grid of settings against a labelled sample,
// recommend one, and optionally write an HTML report.
#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/usage.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/output.h"
#include "cli/output_checks.h"
#include "kindred/explain.h"
#include "kindred/labels.h"
#include "kindred/tune.h"
#include "kindred/tune_report.h"

namespace kindred::cli {
namespace {

// Wrong pairs explained (with their texts) in the HTML report, at most.
constexpr size_t kMaxExplainedPairs = 50;

struct TuneFlags {
  std::vector<std::string> inputs;
  std::string labels;
  InputFlags input;
  GeneralFlags general;
  std::vector<std::string> shingles = {"word:3", "word:5", "word:7"};
  std::vector<uint32_t> perms = {64, 128};
  std::vector<double> thresholds = {0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95};
  uint32_t bandings_per_threshold = 3;
  std::vector<std::string> bandings;
  double target_recall = 0.95;
  double beta = 1;
  std::string measure = "jaccard";
  uint32_t min_contained_size = kDefaultMinContainedSize;
  std::string signer = "oph";
  uint64_t seed = kDefaultSeed;
  bool skip_unknown = false;
  std::string format = "text";
  std::string report;
  size_t top = 20;
};

absl::StatusOr<TuneOptions> ToTuneOptions(const TuneFlags& flags) {
  TuneOptions options;
  options.grid.shingles.clear();
  for (const std::string& text : flags.shingles) {
    absl::StatusOr<ShingleChoice> choice = ParseShingleChoice(text);
    if (!choice.ok()) return choice.status();
    options.grid.shingles.push_back(*choice);
  }
  for (const std::string& text : flags.bandings) {
    absl::StatusOr<Banding> banding = ParseBanding(text);
    if (!banding.ok()) return banding.status();
    options.grid.extra_bandings.push_back(*banding);
  }
  options.grid.perms = flags.perms;
  options.grid.thresholds = flags.thresholds;
  options.grid.bandings_per_threshold = flags.bandings_per_threshold;
  options.target_recall = flags.target_recall;
  options.beta = flags.beta;
  absl::StatusOr<SignerScheme> scheme = ParseSignerScheme(flags.signer);
  if (!scheme.ok()) return AsOptionError(scheme.status());
  options.scheme = *scheme;
  options.seed = flags.seed;
  absl::StatusOr<Measure> measure = ParseMeasure(flags.measure);
  if (!measure.ok()) return AsOptionError(measure.status());
  options.measure = *measure;
  options.min_contained_size = flags.min_contained_size;
  options.skip_unknown_ids = flags.skip_unknown;
  options.threads = ThreadCount(flags.general);
  if (absl::Status status = options.Validate(); !status.ok()) return status;
  return options;
}

// The recommendation's wrong pairs, explained from their texts.
absl::StatusOr<std::vector<ExplainedPair>> ExplainWrongPairs(const TuneResult& result,
                                                             const TuneOptions& options,
                                                             const OpenCorpus& open_corpus) {
  const SettingScore& best = result.recommended();
  std::vector<uint32_t> chosen(
      best.wrong.begin(), best.wrong.begin() + std::min(best.wrong.size(), kMaxExplainedPairs));
  std::vector<std::string> ids;
  for (uint32_t i : chosen) {
    ids.push_back(result.ids[result.labelled[i].a]);
    ids.push_back(result.ids[result.labelled[i].b]);
  }
  std::vector<ExplainedPair> explained;
  if (ids.empty()) return explained;
  absl::StatusOr<std::unique_ptr<CorpusReader>> reader = open_corpus();
  if (!reader.ok()) return reader.status();
  absl::StatusOr<std::vector<std::string>> texts = ReadTexts(**reader, ids);
  if (!texts.ok()) return texts.status();
  for (size_t p = 0; p < chosen.size(); ++p) {
    ExplainedPair pair{chosen[p], {}, std::move((*texts)[2 * p]), std::move((*texts)[2 * p + 1])};
    absl::StatusOr<Explanation> explanation =
        Explain(pair.text_a, pair.text_b, best.setting.Signature(options));
    if (!explanation.ok()) return explanation.status();
    pair.explanation = std::move(*explanation);
    explained.push_back(std::move(pair));
  }
  return explained;
}

// The checks of the command line that ToTuneOptions does not make.
absl::Status CheckFlags(const TuneFlags& flags) {
  for (const std::string& input : flags.inputs) {
    if (input == "-") {
      return absl::InvalidArgumentError(
          "tune reads the corpus once per shingle setting, so it cannot read standard input; "
          "save it to a file first");
    }
  }
  return absl::OkStatus();
}

// Writes the HTML report; returns the exit code.
int WriteReport(const TuneFlags& flags, const TuneReportInput& report,
                const OpenCorpus& open_corpus) {
  absl::StatusOr<std::vector<ExplainedPair>> explained =
      ExplainWrongPairs(*report.result, *report.options, open_corpus);
  if (!explained.ok()) return Fail(ExitCodeFor(explained.status()), explained.status());
  if (absl::Status s = WriteOutputFile(flags.report, FormatTuneHtml(report, *explained)); !s.ok()) {
    return Fail(kExitOutput, s);
  }
  return kExitOk;
}

int RunTuneCommand(const TuneFlags& flags) {
  absl::StatusOr<InputOptions> input_options = ToInputOptions(flags.input);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  absl::StatusOr<TuneOptions> options = ToTuneOptions(flags);
  if (!options.ok()) return Fail(kExitUsage, options.status());
  if (absl::Status s = CheckFlags(flags); !s.ok()) return Fail(kExitUsage, s);
  absl::StatusOr<OutputFormat> format = ParseOutputFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  if (absl::Status s = CheckOutputFile(flags.report); !s.ok()) return Fail(kExitOutput, s);
  absl::StatusOr<std::vector<LabelledPair>> labels = ReadLabels(flags.labels);
  if (!labels.ok()) return Fail(kExitInput, labels.status());

  const OpenCorpus open_corpus = [&flags, &input_options] {
    return CorpusReader::Open(flags.inputs, *input_options);
  };
  Progress progress(flags.general.quiet);
  options->progress = [&progress](std::string_view line) { progress.Update(line); };
  absl::StatusOr<TuneResult> result =
      RunTune(open_corpus, std::move(*labels), flags.labels, *options);
  progress.Clear();
  if (!result.ok()) return Fail(ExitCodeFor(result.status()), result.status());
  for (const std::string& warning : result->warnings) {
    std::fprintf(stderr, "kindred: warning: %s\n", warning.c_str());
  }

  const TuneReportInput report{&*result, &*options, flags.inputs, flags.labels, flags.top, 4};
  if (!flags.report.empty()) {
    if (int code = WriteReport(flags, report, open_corpus); code != kExitOk) return code;
  }
  const std::string out = *format == OutputFormat::kJsonLines ? FormatTuneJsonLines(report)
                                                              : FormatTuneText(report);
  if (absl::Status s = WriteOutputFile("-", out); !s.ok()) return Fail(kExitOutput, s);
  return kExitOk;
}

void AddGridOptions(CLI::App* command, TuneFlags* flags) {
  command
      ->add_option("--shingles", flags->shingles,
                   "shingle settings to try, comma-separated MODE:K "
                   "(word:3,word:5,char:5)")
      ->delimiter(',')
      ->default_str("word:3,word:5,word:7")
      ->group("Grid");
  command->add_option("--perms", flags->perms, "signature lengths to try, comma-separated")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->delimiter(',')
      ->default_str("64,128")
      ->group("Grid");
  command->add_option("--thresholds", flags->thresholds, "thresholds to try, comma-separated")
      ->delimiter(',')
      ->default_str("0.5,0.55,...,0.95")
      ->group("Grid");
  command
      ->add_option("--bandings-per-threshold", flags->bandings_per_threshold,
                   "best bandings (as `kindred plan` ranks them) tried at each "
                   "threshold")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->default_str("3")
      ->group("Grid");
  command
      ->add_option("--bandings", flags->bandings,
                   "more bandings tried at every threshold, comma-separated BANDSxROWS")
      ->delimiter(',')
      ->group("Grid");
  command
      ->add_option("--measure", flags->measure,
                   "similarity compared with the threshold: "
                   "jaccard or containment (containment: each threshold is searched by its "
                   "size-partition plan, as sweep does)")
      ->default_str("jaccard")
      ->group("Grid");
  command
      ->add_option("--min-contained-size", flags->min_contained_size,
                   "containment: the smaller document of a pair needs at least this many "
                   "shingles")
      ->transform(WholeNumber(1, UINT32_MAX))
      ->default_str(std::to_string(kDefaultMinContainedSize))
      ->group("Grid");
  command->add_option("--signer", flags->signer, "MinHash scheme: oph or classic")
      ->default_str("oph")
      ->group("Grid");
  command
      ->add_option("--seed", flags->seed,
                   "hash seed of shingles and signatures (decimal, or hex after 0x)")
      ->transform(WholeNumber(0, UINT64_MAX))
      ->group("Grid");
}

}  // namespace

void RegisterTune(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<TuneFlags>();
  CLI::App* command = app.add_subcommand("tune",
                                         "Evaluate shingle, signature and banding "
                                         "settings against labelled pairs and "
                                         "recommend one");
  command->add_option("inputs", flags->inputs, "the corpus: directories or files")->required();
  command
      ->add_option("-l,--labels", flags->labels,
                   "labelled pairs: TSV, CSV or JSON Lines with columns/fields "
                   "a, b, label. Labels "
                   "(any case): duplicate, dup, yes, true, 1 / distinct, "
                   "different, not-duplicate, "
                   "no, false, 0. A first TSV/CSV line whose label is none of "
                   "these is a header")
      ->required();
  AddInputOptions(command, &flags->input);
  AddGridOptions(command, flags.get());
  command
      ->add_option("--target-recall", flags->target_recall,
                   "recommend the cheapest setting with at least this recall "
                   "at the highest "
                   "precision")
      ->default_str("0.95")
      ->group("Choice");
  command->add_option("--beta", flags->beta, "beta of the F-beta column (1: F1)")
      ->default_str("1")
      ->group("Choice");
  command
      ->add_flag("--skip-unknown-ids", flags->skip_unknown,
                 "leave out labelled pairs whose ids are not in the corpus "
                 "(with a warning) "
                 "instead of failing")
      ->group("Input");
  AddFormatOption(command, &flags->format, {"text", "jsonl"});
  command
      ->add_option("--report", flags->report,
                   "write a self-contained HTML report (plots, table, wrong pairs) here")
      ->group("Output");
  command->add_option("--top", flags->top, "rows of the ranking shown in text and HTML")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->default_str("20")
      ->group("Output");
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, exit_code] { *exit_code = RunTuneCommand(*flags); });
}

}  // namespace kindred::cli
