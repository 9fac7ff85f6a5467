// kindred check: match documents (uploads) against an index, read-only.
//
// Exit status: 0, or 1 with --fail-on-match when any upload matched an
// indexed document, so a shell script can gate on it.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/index_options.h"
#include "cli/output.h"
#include "core/plural.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_query.h"
#include "kindred/records.h"
#include "kindred/signed_corpus.h"
#include "kindred/text.h"

namespace kindred::cli {
namespace {

struct CheckFlags {
  std::string index;
  std::vector<std::string> inputs;
  InputFlags input;
  SignatureFlags signature;
  MatchFlags match;
  GeneralFlags general;
  std::string format = "jsonl";
  bool fail_on_match = false;
  uint64_t max_bucket = kDefaultMaxBucket;
  GivenOptions given;
};

// Median, 99th percentile and largest of the per-document match times
// (nearest rank), on stderr.
void PrintLatencies(std::vector<double> seconds) {
  std::sort(seconds.begin(), seconds.end());
  auto rank = [&seconds](double q) {
    const size_t k = static_cast<size_t>(std::ceil(q * static_cast<double>(seconds.size())));
    return seconds[std::min(seconds.size() - 1, k == 0 ? 0 : k - 1)] * 1e3;
  };
  std::fprintf(stderr,
               "  latency per document: median %.3f ms, 99th percentile %.3f ms, largest %.3f ms "
               "(%s; band lookup and exact verification, signing not included)\n",
               rank(0.5), rank(0.99), seconds.back() * 1e3,
               Counted(seconds.size(), "document").c_str());
}

int RunCheck(const CheckFlags& flags) {
  auto format = ParseRecordFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  auto input_options = ToInputOptions(flags.input);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  if (absl::Status valid = ValidMaxBucket(flags.max_bucket); !valid.ok()) {
    return Fail(kExitUsage, valid);
  }
  ReportStaleTempFiles(flags.index);
  auto reader = IndexReader::Open(flags.index);
  if (!reader.ok()) return Fail(reader.status());
  if ((*reader)->torn_tail_bytes() > 0 && !flags.general.quiet) {
    std::fprintf(stderr, "kindred: warning: index %s has a torn tail of %s (ignored)\n",
                 flags.index.c_str(), Counted((*reader)->torn_tail_bytes(), "byte").c_str());
  }
  MatchSettings match;
  if (int code =
          PrepareIndexQuery(flags.signature, flags.match, flags.given, reader->get(), &match);
      code != kExitOk) {
    return code;
  }
  const int threads = ThreadCount(flags.general);
  SignedCorpus uploads((*reader)->settings().signature.perms);
  SignStats stats;
  if (absl::Status status = SignInputs(flags.inputs, *input_options,
                                       (*reader)->settings().signature, threads, &uploads, &stats);
      !status.ok()) {
    return Fail(kExitInput, status);
  }
  IndexMatchOptions options{match, threads, false};
  options.max_bucket = flags.max_bucket;
  uint64_t crowded = 0;
  options.crowded_keys = &crowded;
  std::vector<double> latencies;
  if (flags.general.verbose) options.query_seconds = &latencies;
  auto matches = MatchForQuery(**reader, uploads, std::nullopt, options);
  if (!matches.ok()) return Fail(matches.status());
  std::string out;
  WriteMatchRecords(*format, *matches, **reader, uploads, &out, &match);
  if (absl::Status written = WriteOutputFile("-", out); !written.ok()) {
    return Fail(kExitOutput, written);
  }
  size_t matched_count = CountMatchedUploads(*matches, uploads.size());
  if (!flags.general.quiet) {
    std::fprintf(stderr,
                 "kindred check: %s checked against %u indexed (%s >= %g, %s): %s indexed "
                 "documents, %llu empty\n",
                 Counted(uploads.size(), "document").c_str(), (*reader)->live_count(),
                 MeasureName(match.measure), match.threshold,
                 CandidateSearchText(**reader, match).c_str(),
                 // the verb: "1 matches", "2 match"
                 Counted(matched_count, "matches", "match").c_str(),
                 static_cast<unsigned long long>(stats.empty_documents));
    PrintCrowdedKeys(crowded, flags.max_bucket);
  }
  if (flags.general.verbose && !latencies.empty()) PrintLatencies(latencies);
  return flags.fail_on_match && matched_count > 0 ? kExitMatched : kExitOk;
}

}  // namespace

void RegisterCheck(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<CheckFlags>();
  CLI::App* command =
      app.add_subcommand("check", "Match documents (uploads) against an index without changing it");
  command->add_option("index", flags->index, "the index file")->required();
  AddInputsArgument(command, &flags->inputs)->required();
  AddInputOptions(command, &flags->input);
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  AddMaxBucketOption(command, &flags->max_bucket);
  AddFormatOption(command, &flags->format, {"jsonl", "tsv", "csv"});
  command
      ->add_flag("--fail-on-match", flags->fail_on_match,
                 "exit with status 1 when any document matches an indexed document")
      ->group("Output");
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, command, exit_code] {
    flags->given = OptionsGiven(command);
    *exit_code = RunCheck(*flags);
  });
}

}  // namespace kindred::cli
