// kindred sweep: one-shot deduplication of a corpus. The command line is
// read in sweep_options.cc, the outputs written in sweep_outputs.cc and the
// summary printed in sweep_summary.cc; this file runs them in order.
#include <stdlib.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <filesystem>

#include "absl/strings/str_cat.h"
#include "cli/cli.h"
#include "cli/output.h"
#include "cli/record_counts.h"
#include "cli/sweep_flags.h"
#include "kindred/index.h"
#include "kindred/index_match.h"

namespace kindred::cli {
namespace {

// The groups of an index sweep made again when --grouping asks for other
// groups than the components SweepIndex makes, and the counts of the
// summary.
void RegroupIndexSweep(const RecordOutputs& records, SweepResult* result) {
  if (records.grouping != Grouping::kComponents) {
    result->groups =
        GroupPairs(result->pairs, result->corpus.all_facts(), records.keep, records.grouping);
    result->stats.groups = result->groups.size();
    result->stats.drops = 0;
    for (const Group& group : result->groups) result->stats.drops += group.members.size() - 1;
  }
  result->stats.sign.documents = result->corpus.size();
  for (size_t doc = 0; doc < result->corpus.size(); ++doc) {
    result->stats.sign.empty_documents += result->corpus.shingle_count(doc) == 0;
  }
}

// kindred sweep --index: the pairs and groups of everything indexed, from the
// stored shingle sets and signatures, without re-reading the corpus.
int RunIndexSweep(const SweepFlags& flags) {
  if (!flags.inputs.empty()) {
    return Fail(kExitUsage, absl::InvalidArgumentError("give inputs or --index, not both"));
  }
  if (WantsKept(flags)) {
    return Fail(kExitUsage, absl::InvalidArgumentError(
                                "--write-kept, --copy-kept and --list-kept need the corpus, not "
                                "--index; use the decisions with the corpus instead"));
  }
  ReportStaleTempFiles(flags.index);
  auto reader = IndexReader::Open(flags.index);
  if (!reader.ok()) return Fail(reader.status());
  SweepOptions options;
  if (int code = PrepareIndexQuery(flags.signature, flags.match, flags.given, reader->get(),
                                   &options.match);
      code != kExitOk) {
    return code;
  }
  auto records = ToRecordOutputs(flags, /*corpus=*/false);
  if (!records.ok()) return Fail(kExitUsage, records.status());
  options.keep = records->keep;
  options.grouping = records->grouping;
  auto result = SweepIndex(**reader, options.match, options.keep, ThreadCount(flags.general));
  if (!result.ok()) return Fail(result.status());
  RegroupIndexSweep(*records, &*result);
  if (absl::Status status = WriteRecordOutputs(*records, *result); !status.ok()) {
    return Fail(kExitOutput, status);
  }
  if (!flags.general.quiet) {
    std::fprintf(stderr, "kindred sweep: index %s\n", flags.index.c_str());
    PrintSweepSummary(*result, options);
  }
  return kExitOk;
}

// A copy of standard input, in a private new directory (mkdtemp) so that no
// one can plant a link at its name; removed when the sweep ends.
class StdinCopy {
 public:
  StdinCopy() = default;
  StdinCopy(const StdinCopy&) = delete;
  StdinCopy& operator=(const StdinCopy&) = delete;
  ~StdinCopy() {
    if (dir_.empty()) return;
    std::remove(absl::StrCat(dir_, "/stdin").c_str());
    rmdir(dir_.c_str());
  }

  // Makes the directory under $TMPDIR (or /tmp) and returns the copy's path.
  absl::StatusOr<std::string> Make() {
    std::error_code error;
    std::filesystem::path base = std::filesystem::temp_directory_path(error);
    if (error) base = "/tmp";
    std::string pattern = (base / "kindred-XXXXXX").string();
    if (mkdtemp(pattern.data()) == nullptr) {
      return absl::ErrnoToStatus(errno, absl::StrCat("cannot create a temporary directory in ",
                                                     base.string(), " for standard input"));
    }
    dir_ = pattern;
    return absl::StrCat(dir_, "/stdin");
  }

 private:
  std::string dir_;
};

bool ReadsStdin(const SweepFlags& flags) {
  return std::find(flags.inputs.begin(), flags.inputs.end(), "-") != flags.inputs.end();
}

// Progress of signing on a terminal and, with -v, the documents with
// invalid UTF-8, on stderr.
void ReportSigning(const SweepFlags& flags, Progress* progress, SweepOptions* options) {
  options->sign.progress = [progress](const SignStats& stats) {
    progress->Update(SigningProgress(stats, progress->Elapsed()));
  };
  if (flags.general.verbose) {
    options->sign.on_invalid_utf8 = [](const std::string& id, uint32_t invalid) {
      std::fprintf(stderr, "kindred: note: %s: %u invalid UTF-8 sequences replaced by U+FFFD\n",
                   id.c_str(), invalid);
    };
  }
}

void PrintCorpusSummary(const SweepFlags& flags, const SweepResult& result,
                        const SweepOptions& options, const CorpusReader& reader, double seconds) {
  if (!flags.general.quiet) {
    PrintSweepSummary(result, options);
    PrintHtmlPages(result.stats.sign);
    PrintRecordCounts(reader);
    PrintSkips(reader.skips());
    PrintThroughput(result.stats.sign.documents, result.stats.sign.bytes, seconds);
  }
  if (flags.general.verbose) {
    std::fprintf(stderr, "  time              %.2f s signing, %.2f s matching\n",
                 result.stats.sign_seconds, result.stats.match_seconds);
  }
}

int RunSweepCommand(const SweepFlags& flags) {
  if (!flags.index.empty()) return RunIndexSweep(flags);
  if (flags.inputs.empty()) {
    return Fail(kExitUsage, absl::InvalidArgumentError("no inputs (or --index) given"));
  }
  SweepPlan plan;
  if (absl::Status status = ToSweepPlan(flags, &plan); !status.ok()) {
    return Fail(kExitUsage, status);
  }
  // Standard input cannot be read twice: keep a copy when verification (an
  // LSH sweep reads the documents of candidate pairs again) or the kept
  // corpus will need a second pass.
  StdinCopy stdin_copy;
  if ((WantsKept(flags) || !plan.options.exhaustive) && ReadsStdin(flags)) {
    absl::StatusOr<std::string> path = stdin_copy.Make();
    if (!path.ok()) return Fail(kExitOutput, path.status());
    plan.input.stdin_copy_path = *path;
  }
  auto reader = CorpusReader::Open(flags.inputs, plan.input);
  if (!reader.ok()) return Fail(kExitInput, reader.status());
  if (int code = CheckSweepOutputs(flags, plan.records, **reader); code != kExitOk) return code;
  Progress progress(flags.general.quiet);
  ReportSigning(flags, &progress, &plan.options);
  auto result = RunSweep(**reader, plan.options);
  progress.Clear();
  if (!result.ok()) {
    // A scratch file that cannot be written or read is a write failure (7).
    return Fail(result.status());
  }
  if (absl::Status status = WriteRecordOutputs(plan.records, *result); !status.ok()) {
    return Fail(kExitOutput, status);
  }
  if (int code = WriteKeptOutputs(flags, *result, **reader, plan.input); code != kExitOk) {
    return code;
  }
  PrintCorpusSummary(flags, *result, plan.options, **reader, progress.Elapsed());
  return kExitOk;
}

}  // namespace

void RegisterSweep(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<SweepFlags>();
  CLI::App* command = app.add_subcommand(
      "sweep", "Find the near-duplicate pairs and groups of a corpus; say what to keep and drop");
  AddSweepOptions(command, flags.get());
  command->callback([flags, exit_code, command] {
    flags->given = OptionsGiven(command);
    *exit_code = RunSweepCommand(*flags);
  });
}

}  // namespace kindred::cli
