// kindred sweep, in pieces: the command line (sweep_options.cc), the checks
// of its outputs and the outputs themselves (sweep_outputs.cc), the summary
// on stderr (sweep_summary.cc), and the command that runs them in order
// (sweep_command.cc).
#ifndef KINDRED_CLI_SWEEP_FLAGS_H_
#define KINDRED_CLI_SWEEP_FLAGS_H_

#include <cstdint>
#include <string>
#include <vector>

#include "CLI/CLI.hpp"
#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "cli/common_options.h"
#include "cli/index_options.h"
#include "kindred/corpus.h"
#include "kindred/groups.h"
#include "kindred/kept_writer.h"
#include "kindred/records.h"
#include "kindred/sweep.h"

namespace kindred::cli {

struct SweepFlags {
  std::vector<std::string> inputs;
  std::string index;
  GivenOptions given;
  InputFlags input;
  SignatureFlags signature;
  MatchFlags match;
  GeneralFlags general;
  std::string keep = "first";
  std::string grouping = "components";
  bool exhaustive = false;
  uint64_t max_bucket = kDefaultMaxBucket;
  std::string memory;
  std::string scratch_dir;
  std::string output_dir;
  std::string print;
  std::string format = "jsonl";
  std::string write_kept;
  std::string copy_kept;
  std::string list_kept;
};

// Registers the options of sweep on `command`, bound to *flags.
void AddSweepOptions(CLI::App* command, SweepFlags* flags);

// The record kind --print sends to standard output.
enum class PrintedRecords : uint8_t { kNone, kPairs, kGroups, kDecisions };

// What the records of a sweep are written as, and where.
struct RecordOutputs {
  RecordFormat format = RecordFormat::kJsonLines;
  KeepPolicy keep = KeepPolicy::kFirst;
  Grouping grouping = Grouping::kComponents;
  PrintedRecords print = PrintedRecords::kGroups;
  std::string output_dir;  // empty: no record files
  int threads = 1;         // that format the records
};

// --keep, --grouping, --format, --print and --output-dir, validated. For a
// corpus sweep (`corpus`), --keep priority needs --priority-field. Errors
// are usage errors.
absl::StatusOr<RecordOutputs> ToRecordOutputs(const SweepFlags& flags, bool corpus);

// A corpus sweep (inputs, not --index) as the command line asks for it.
struct SweepPlan {
  InputOptions input;
  SweepOptions options;
  RecordOutputs records;
};

// Validates the command line of a corpus sweep into *plan. Errors are usage
// errors.
absl::Status ToSweepPlan(const SweepFlags& flags, SweepPlan* plan);

// Whether any of --write-kept, --copy-kept, --list-kept is given.
bool WantsKept(const SweepFlags& flags);

// The directory of the scratch file of --memory: --scratch-dir, else
// $TMPDIR, else /tmp.
std::string ScratchDirectoryOf(const SweepFlags& flags);

// The checks made after the inputs are resolved and before any is read:
// record files, kept outputs, and with --memory the scratch directory.
// Returns kExitOk, or the exit code after printing the error.
int CheckSweepOutputs(const SweepFlags& flags, const RecordOutputs& records,
                      const CorpusReader& reader);

// Formats the record kinds asked for (all three for --output-dir, the one
// --print names) and writes them. Errors are output errors.
absl::Status WriteRecordOutputs(const RecordOutputs& records, const SweepResult& result);

// Writes the kept corpus the kept options ask for. Returns kExitOk, or the
// exit code after printing the error.
int WriteKeptOutputs(const SweepFlags& flags, const SweepResult& result, const CorpusReader& reader,
                     const InputOptions& input_options);

// The summary of a sweep on stderr (sweep_summary.cc).
void PrintSweepSummary(const SweepResult& result, const SweepOptions& options);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_SWEEP_FLAGS_H_
