// The command line of kindred sweep: its options and their validation.
#include <cstdlib>

#include "absl/strings/str_cat.h"
#include "cli/formats.h"
#include "cli/output.h"
#include "cli/sweep_flags.h"

namespace kindred::cli {
namespace {

void AddResourceOptions(CLI::App* command, SweepFlags* flags) {
  command
      ->add_option("--memory", flags->memory,
                   "bound on the band keys held in memory, e.g. 4G: band keys beyond half of it "
                   "are spilled to sorted runs in the scratch directory (same results; default: "
                   "no bound). Not counted: signatures, ids, documents being signed, and the "
                   "shingle sets of candidate documents reloaded for verification (README "
                   "\"Memory\")")
      ->group("Resources");
  command
      ->add_option("--scratch-dir", flags->scratch_dir,
                   "directory for spilled data (default: $TMPDIR, else /tmp); its files are "
                   "removed at once and vanish when kindred exits")
      ->group("Resources");
}

void AddGroupingOptions(CLI::App* command, SweepFlags* flags) {
  command->add_option("--keep", flags->keep, "keeper of each group: first, longest or priority")
      ->default_str("first")
      ->group("Grouping");
  command
      ->add_option("--grouping", flags->grouping,
                   "components (a group is a connected component of confirmed pairs) or "
                   "keepers (the best document by --keep takes every ungrouped document it "
                   "has a confirmed pair with, and so on: each drop is confirmed with its "
                   "keeper)")
      ->default_str("components")
      ->group("Grouping");
}

void AddOutputOptions(CLI::App* command, SweepFlags* flags) {
  command
      ->add_option("-o,--output-dir", flags->output_dir,
                   "write pairs, groups and decisions files into this directory")
      ->group("Output");
  command
      ->add_option("--print", flags->print,
                   "records on standard output: pairs, groups, decisions or none (default: "
                   "groups, or none with --output-dir)")
      ->check(CLI::IsMember({"pairs", "groups", "decisions", "none"}))
      ->group("Output");
  AddFormatOption(command, &flags->format, {"jsonl", "tsv", "csv"});
  command
      ->add_option("--write-kept", flags->write_kept,
                   "JSON Lines inputs: write the kept lines, verbatim, to this file; WARC inputs: "
                   "the kept records, byte for byte, to this WARC file (.gz/.zst compress)")
      ->group("Output");
  command
      ->add_option("--copy-kept", flags->copy_kept,
                   "text inputs: copy the kept files into this new or empty directory")
      ->group("Output");
  command
      ->add_option("--list-kept", flags->list_kept,
                   "text inputs: write the kept file paths, one per line, to this file")
      ->group("Output");
}

// --print; by default groups, or nothing when --output-dir writes files.
absl::StatusOr<PrintedRecords> ParsePrinted(const SweepFlags& flags) {
  if (flags.print.empty()) {
    return flags.output_dir.empty() ? PrintedRecords::kGroups : PrintedRecords::kNone;
  }
  for (const auto& [name, printed] :
       {std::pair{"none", PrintedRecords::kNone}, std::pair{"pairs", PrintedRecords::kPairs},
        std::pair{"groups", PrintedRecords::kGroups},
        std::pair{"decisions", PrintedRecords::kDecisions}}) {
    if (flags.print == name) return printed;
  }
  return absl::InvalidArgumentError(absl::StrCat(
      "--print: expected pairs, groups, decisions or none, not \"", flags.print, "\""));
}

// --memory (at least 1M; unset: no bound) and --scratch-dir into *options.
absl::Status ToResources(const SweepFlags& flags, SweepOptions* options) {
  if (!flags.memory.empty()) {
    auto memory = ParseByteSize(flags.memory);
    if (!memory.ok()) return memory.status();
    if (*memory < (uint64_t{1} << 20)) {
      return absl::InvalidArgumentError("--memory must be at least 1M");
    }
    options->memory = *memory;
  }
  options->scratch_dir = ScratchDirectoryOf(flags);
  return absl::OkStatus();
}

}  // namespace

std::string ScratchDirectoryOf(const SweepFlags& flags) {
  if (!flags.scratch_dir.empty()) return flags.scratch_dir;
  const char* tmpdir = std::getenv("TMPDIR");
  return tmpdir != nullptr && *tmpdir != '\0' ? tmpdir : "/tmp";
}

void AddSweepOptions(CLI::App* command, SweepFlags* flags) {
  AddInputsArgument(command, &flags->inputs);
  command->add_option("--index", flags->index,
                      "sweep the documents of this index file instead of inputs (the corpus is "
                      "not re-read)");
  AddInputOptions(command, &flags->input);
  AddPriorityFieldOption(command, &flags->input, /*stored=*/false);
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  command
      ->add_flag("--exhaustive", flags->exhaustive,
                 "compare every pair exactly instead of using LSH (slow; the reference)")
      ->group("Matching");
  AddMaxBucketOption(command, &flags->max_bucket);
  AddResourceOptions(command, flags);
  AddGroupingOptions(command, flags);
  AddOutputOptions(command, flags);
  AddGeneralOptions(command, &flags->general);
}

absl::StatusOr<RecordOutputs> ToRecordOutputs(const SweepFlags& flags, bool corpus) {
  RecordOutputs records;
  auto keep = ParseKeepPolicy(flags.keep);
  if (!keep.ok()) return keep.status();
  if (corpus && *keep == KeepPolicy::kPriority && flags.input.priority_field.empty()) {
    return absl::InvalidArgumentError(
        "--keep priority needs --priority-field NAME (the JSON Lines field holding each "
        "document's priority)");
  }
  records.keep = *keep;
  auto grouping = ParseGrouping(flags.grouping);
  if (!grouping.ok()) return grouping.status();
  records.grouping = *grouping;
  auto format = ParseRecordFormat(flags.format);
  if (!format.ok()) return format.status();
  records.format = *format;
  auto print = ParsePrinted(flags);
  if (!print.ok()) return print.status();
  records.print = *print;
  records.output_dir = flags.output_dir;
  records.threads = ThreadCount(flags.general);
  return records;
}

absl::Status ToSweepPlan(const SweepFlags& flags, SweepPlan* plan) {
  auto input_options = ToInputOptions(flags.input, flags.general.verbose);
  if (!input_options.ok()) return input_options.status();
  plan->input = *std::move(input_options);
  SweepOptions& options = plan->options;
  auto signature = ToSignatureSettings(flags.signature);
  if (!signature.ok()) return signature.status();
  options.signature = *signature;
  auto match = ToMatchSettings(flags.match, options.signature);
  if (!match.ok()) return match.status();
  options.match = *match;
  auto records = ToRecordOutputs(flags, /*corpus=*/true);
  if (!records.ok()) return records.status();
  plan->records = *std::move(records);
  options.keep = plan->records.keep;
  options.grouping = plan->records.grouping;
  options.exhaustive = flags.exhaustive;
  if (absl::Status valid = ValidMaxBucket(flags.max_bucket); !valid.ok()) return valid;
  options.max_bucket = flags.max_bucket;
  if (absl::Status status = ToResources(flags, &options); !status.ok()) return status;
  options.sign.threads = ThreadCount(flags.general);
  return absl::OkStatus();
}

}  // namespace kindred::cli
