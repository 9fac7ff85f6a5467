// kindred sweep: one-shot deduplication of a corpus.
#include <stdlib.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <filesystem>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/formats.h"
#include "cli/index_options.h"
#include "cli/output.h"
#include "cli/output_checks.h"
#include "core/plural.h"
#include "io/byte_stream.h"
#include "io/output_guard.h"
#include "io/warc_reader.h"
#include "kindred/errors.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/kept_writer.h"
#include "cli/record_counts.h"
#include "kindred/records.h"
#include "kindred/shingles.h"
#include "kindred/sweep.h"

namespace kindred::cli {
namespace {

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

// Formats the record kinds the flags ask for (all three for -o, the one
// --print names; the default prints groups when there is no -o) and writes
// them. Kinds nobody asked for are not formatted.
absl::Status WriteOutputs(const SweepFlags& flags, const SweepResult& result, RecordFormat format,
                          KeepPolicy keep, Grouping grouping) {
  std::string print = flags.print;
  if (print.empty()) print = flags.output_dir.empty() ? "groups" : "none";
  const bool to_dir = !flags.output_dir.empty();
  const auto ids = result.corpus.ids();
  std::string pairs, groups, decisions;
  if (to_dir || print == "pairs") WritePairRecords(format, result.pairs, ids, &pairs);
  if (to_dir || print == "groups") {
    WriteGroupRecords(format, result.groups, ids, keep, &groups, grouping);
  }
  if (to_dir || print == "decisions") {
    std::vector<uint8_t> empty(result.corpus.size());
    for (size_t doc = 0; doc < empty.size(); ++doc) {
      empty[doc] = result.corpus.shingle_count(doc) == 0;
    }
    WriteDecisionRecords(format, result.groups, result.pairs, ids, empty, keep, &decisions,
                         result.corpus.all_facts(), grouping);
  }
  if (to_dir) {
    std::error_code error;
    std::filesystem::create_directories(flags.output_dir, error);
    if (error) {
      return WriteFailed(
          absl::StrCat("cannot create output directory ", flags.output_dir, ": ", error.message()));
    }
    const std::string suffix = RecordFormatSuffix(format);
    for (const auto& [name, data] : {std::pair{"pairs", &pairs}, std::pair{"groups", &groups},
                                     std::pair{"decisions", &decisions}}) {
      const std::string path = absl::StrCat(flags.output_dir, "/", name, ".", suffix);
      if (absl::Status status = WriteOutputFile(path, *data); !status.ok()) return status;
    }
  }
  if (print == "pairs") return WriteOutputFile("-", pairs);
  if (print == "groups") return WriteOutputFile("-", groups);
  if (print == "decisions") return WriteOutputFile("-", decisions);
  return absl::OkStatus();
}

void PrintSummary(const SweepResult& result, const SweepOptions& options) {
  const SweepStats& stats = result.stats;
  std::fprintf(stderr, "kindred sweep: %s (%llu empty)",
               Counted(stats.sign.documents, "document").c_str(),
               static_cast<unsigned long long>(stats.sign.empty_documents));
  if (stats.sign.bytes > 0) {
    std::fprintf(stderr, ", %.1f MB", static_cast<double>(stats.sign.bytes) / 1e6);
  }
  std::fprintf(stderr, "\n");
  if (options.exhaustive) {
    std::fprintf(stderr, "  candidate pairs   all (exhaustive comparison)\n");
  } else if (stats.containment_search) {
    std::fprintf(
        stderr, "  candidate pairs   %llu (containment LSH: %u size partitions, %llu bandings)\n",
        static_cast<unsigned long long>(stats.candidates.candidate_pairs),
        stats.containment_partitions, static_cast<unsigned long long>(stats.containment.bandings));
  } else {
    std::fprintf(stderr, "  candidate pairs   %llu (%s)\n",
                 static_cast<unsigned long long>(stats.candidates.candidate_pairs),
                 BandsByRows(stats.banding.bands, stats.banding.rows).c_str());
  }
  if (!options.exhaustive && stats.candidates.oversized_buckets > 0) {
    std::fprintf(stderr,
                 "  crowded buckets   %llu over %llu documents (largest %llu): members paired "
                 "with the first only (--max-bucket)\n",
                 static_cast<unsigned long long>(stats.candidates.oversized_buckets),
                 static_cast<unsigned long long>(options.max_bucket),
                 static_cast<unsigned long long>(stats.candidates.largest_bucket));
  }
  if (options.match.measure == Measure::kContainment && stats.containment.below_min_size > 0) {
    std::fprintf(stderr,
                 "  small documents   %llu under %u shingles: in no containment pair "
                 "(--min-contained-size)\n",
                 static_cast<unsigned long long>(stats.containment.below_min_size),
                 options.match.min_contained_size);
  }
  if (stats.spill_runs > 0) {
    std::fprintf(stderr, "  spilled           %.1f MB of band keys in %s (--memory %s)\n",
                 static_cast<double>(stats.spilled_bytes) / 1e6,
                 Counted(stats.spill_runs, "run").c_str(),
                 absl::StrFormat("%.0fM", static_cast<double>(options.memory) / (1 << 20)).c_str());
  }
  std::fprintf(stderr, "  confirmed pairs   %llu (%s >= %g)\n",
               static_cast<unsigned long long>(stats.confirmed_pairs),
               MeasureName(options.match.measure), options.match.threshold);
  std::fprintf(stderr, "  groups            %llu%s\n", static_cast<unsigned long long>(stats.groups),
               options.grouping == Grouping::kKeepers ? " (around keepers: --grouping keepers)"
                                                      : "");
  std::fprintf(stderr, "  drops             %llu (keep policy: %s)\n",
               static_cast<unsigned long long>(stats.drops), KeepPolicyName(options.keep));
  if (options.keep == KeepPolicy::kPriority) {
    uint64_t without = 0;
    for (const KeepFacts& facts : result.corpus.all_facts()) without += !facts.has_priority;
    if (without > 0) {
      std::fprintf(stderr, "  no priority       %llu of %llu documents lack the priority field "
                   "(they rank lowest)\n",
                   static_cast<unsigned long long>(without),
                   static_cast<unsigned long long>(result.corpus.size()));
    }
  }
  if (stats.sign.invalid_utf8_documents > 0) {
    std::fprintf(stderr, "  invalid UTF-8     %s, bytes replaced by U+FFFD (-v names them)\n",
                 Counted(stats.sign.invalid_utf8_documents, "document").c_str());
  }
}

bool WantsKept(const SweepFlags& flags) {
  return !flags.write_kept.empty() || !flags.copy_kept.empty() || !flags.list_kept.empty();
}

absl::StatusOr<KeptCounts> WriteKeptCorpus(const SweepFlags& flags, const SweepResult& result,
                                           const CorpusReader& reader,
                                           const InputOptions& input_options) {
  std::vector<uint8_t> dropped(result.corpus.size(), 0);
  for (const Group& group : result.groups) {
    for (uint32_t member : group.members) dropped[member] = member != group.keeper;
  }
  KeptRequest request;
  request.inputs = reader.ResolvedInputs();
  request.options = input_options;
  request.keep = [&dropped](uint64_t ordinal) { return !dropped[ordinal]; };
  request.expected_documents = reader.documents_read();
  request.output = KeptOutput{flags.write_kept, flags.copy_kept, flags.list_kept};
  return WriteKept(request);
}

bool ReadsStdin(const SweepFlags& flags) {
  return std::find(flags.inputs.begin(), flags.inputs.end(), "-") != flags.inputs.end();
}

// A new directory only this user can enter, under $TMPDIR (or /tmp).
absl::StatusOr<std::string> MakePrivateTempDir() {
  std::error_code error;
  std::filesystem::path base = std::filesystem::temp_directory_path(error);
  if (error) base = "/tmp";
  std::string pattern = (base / "kindred-XXXXXX").string();
  if (mkdtemp(pattern.data()) == nullptr) {
    return absl::ErrnoToStatus(errno, absl::StrCat("cannot create a temporary directory in ",
                                                   base.string(), " for standard input"));
  }
  return pattern;
}

// The record files of --output-dir never replace an input nor land inside
// an input tree, and no kept output is one of them.
absl::Status CheckRecordOutputs(const SweepFlags& flags, RecordFormat format,
                                const CorpusReader& reader) {
  if (flags.output_dir.empty()) return absl::OkStatus();
  std::vector<ResolvedInput> inputs;
  for (ResolvedInput& input : reader.ResolvedInputs()) {
    if (!input.is_stdin) inputs.push_back(std::move(input));
  }
  for (const char* name : {"pairs", "groups", "decisions"}) {
    const std::string path =
        absl::StrCat(flags.output_dir, "/", name, ".", RecordFormatSuffix(format));
    KeptOutput record;
    record.lines_path = path;
    if (absl::Status status = io::CheckOutputs(inputs, record, true, false); !status.ok()) {
      return status;
    }
    for (const std::string* kept : {&flags.write_kept, &flags.list_kept}) {
      if (kept->empty()) continue;
      absl::StatusOr<std::string> a = io::ResolvePath(path), b = io::ResolvePath(*kept);
      if (a.ok() && b.ok() && *a == *b) {
        return absl::InvalidArgumentError(
            absl::StrCat(*kept, ": is also a record file of --output-dir"));
      }
    }
  }
  return absl::OkStatus();
}

// Whether an input's kept documents are written as records into --write-kept
// like JSON Lines: a WARC input, known by its format or, read by content, by
// its first bytes. A directory read by content may hold WARC files; it is
// taken as WARC when the kept file is named as one (.warc, .warc.gz, ...).
absl::StatusOr<bool> KeptAsRecords(const ResolvedInput& input, const std::string& write_kept) {
  if (input.format == InputFormat::kWarc) return true;
  if (input.format != InputFormat::kText || input.is_stdin) return false;
  if (input.is_directory) return absl::StrContains(write_kept, ".warc");
  auto stream = io::OpenDecoded(input.name, io::DecodeOptions());
  if (!stream.ok()) return stream.status();
  return io::SniffWarc(&*stream);
}

// The kept outputs the inputs need, checked before any input is read: each
// text input needs --copy-kept or --list-kept, each JSON Lines input
// --write-kept, and no kept output is given that no input needs. Standard
// input of unknown format is judged when it has been read.
absl::Status CheckKeptOptions(const SweepFlags& flags, const CorpusReader& reader) {
  if (!WantsKept(flags)) return absl::OkStatus();
  if (!flags.copy_kept.empty() && !flags.list_kept.empty()) {
    return absl::InvalidArgumentError("give --copy-kept or --list-kept, not both");
  }
  bool needs_lines = false, needs_text = false, unknown = false;
  std::vector<ResolvedInput> inputs;
  for (ResolvedInput& input : reader.ResolvedInputs()) {
    if (input.format == InputFormat::kAuto) {
      unknown = true;
      continue;
    }
    absl::StatusOr<bool> warc = KeptAsRecords(input, flags.write_kept);
    if (!warc.ok()) return warc.status();
    const bool lines = input.format == InputFormat::kJsonLines || *warc;
    if (lines && flags.write_kept.empty()) {
      return absl::InvalidArgumentError(absl::StrCat(
          input.name, *warc ? " is a crawl archive: give --write-kept FILE for its kept records"
                            : " is JSON Lines: give --write-kept FILE for its kept lines",
          " (--copy-kept and --list-kept take text documents)"));
    }
    if (!lines && flags.copy_kept.empty() && flags.list_kept.empty()) {
      return absl::InvalidArgumentError(absl::StrCat(
          input.name, " holds text documents: give --copy-kept DIR or --list-kept FILE for "
                      "them (--write-kept takes the kept lines of JSON Lines inputs)"));
    }
    (lines ? needs_lines : needs_text) = true;
    if (!input.is_stdin) inputs.push_back(std::move(input));
  }
  if (!unknown && !needs_lines && !flags.write_kept.empty()) {
    return absl::InvalidArgumentError(
        "--write-kept: no input is JSON Lines (text documents take --copy-kept or --list-kept)");
  }
  if (!unknown && !needs_text && (!flags.copy_kept.empty() || !flags.list_kept.empty())) {
    return absl::InvalidArgumentError(absl::StrCat(
        flags.copy_kept.empty() ? "--list-kept" : "--copy-kept",
        ": no input holds text documents (JSON Lines inputs take --write-kept)"));
  }
  KeptOutput output{flags.write_kept, flags.copy_kept, flags.list_kept};
  return io::CheckOutputs(inputs, output, !flags.write_kept.empty(),
                          !flags.copy_kept.empty() || !flags.list_kept.empty());
}

// Every output location can be written (exit 7 otherwise; 2 for an invalid
// name), before the work.
absl::Status CheckOutputLocations(const SweepFlags& flags) {
  absl::Status status = CheckOutputDirectory(flags.output_dir);
  if (status.ok()) status = CheckKeptFile(flags.write_kept);
  if (status.ok()) status = CheckKeptFile(flags.list_kept);
  if (status.ok()) status = CheckCopyDirectory(flags.copy_kept);
  return status;
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
  MatchSettings match;
  if (int code =
          PrepareIndexQuery(flags.signature, flags.match, flags.given, reader->get(), &match);
      code != kExitOk) {
    return code;
  }
  if (match.measure == Measure::kContainment && flags.match.bands == 0) {
    match.bands = match.rows = 0;  // the containment LSH, not the stored banding
  }
  auto keep = ParseKeepPolicy(flags.keep);
  if (!keep.ok()) return Fail(kExitUsage, keep.status());
  auto format = ParseRecordFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  auto grouping = ParseGrouping(flags.grouping);
  if (!grouping.ok()) return Fail(kExitUsage, grouping.status());
  auto result = SweepIndex(**reader, match, *keep, ThreadCount(flags.general));
  if (!result.ok()) return Fail(result.status());
  if (*grouping != Grouping::kComponents) {
    result->groups = GroupPairs(result->pairs, result->corpus.all_facts(), *keep, *grouping);
    result->stats.groups = result->groups.size();
    result->stats.drops = 0;
    for (const Group& group : result->groups) result->stats.drops += group.members.size() - 1;
  }
  result->stats.sign.documents = result->corpus.size();
  for (size_t doc = 0; doc < result->corpus.size(); ++doc) {
    result->stats.sign.empty_documents += result->corpus.shingle_count(doc) == 0;
  }
  if (absl::Status status = WriteOutputs(flags, *result, *format, *keep, *grouping);
      !status.ok()) {
    return Fail(kExitOutput, status);
  }
  if (!flags.general.quiet) {
    SweepOptions options;
    options.match = match;
    options.keep = *keep;
    options.grouping = *grouping;
    std::fprintf(stderr, "kindred sweep: index %s\n", flags.index.c_str());
    PrintSummary(*result, options);
  }
  return kExitOk;
}

int RunSweepCommand(const SweepFlags& flags) {
  if (!flags.index.empty()) return RunIndexSweep(flags);
  if (flags.inputs.empty()) {
    return Fail(kExitUsage, absl::InvalidArgumentError("no inputs (or --index) given"));
  }
  auto input_options = ToInputOptions(flags.input, flags.general.verbose);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  SweepOptions options;
  auto signature = ToSignatureSettings(flags.signature);
  if (!signature.ok()) return Fail(kExitUsage, signature.status());
  options.signature = *signature;
  auto match = ToMatchSettings(flags.match, options.signature);
  if (!match.ok()) return Fail(kExitUsage, match.status());
  options.match = *match;
  auto keep = ParseKeepPolicy(flags.keep);
  if (!keep.ok()) return Fail(kExitUsage, keep.status());
  if (*keep == KeepPolicy::kPriority && flags.input.priority_field.empty()) {
    return Fail(kExitUsage, absl::InvalidArgumentError(
                                "--keep priority needs --priority-field NAME (the JSON Lines "
                                "field holding each document's priority)"));
  }
  options.keep = *keep;
  auto grouping = ParseGrouping(flags.grouping);
  if (!grouping.ok()) return Fail(kExitUsage, grouping.status());
  options.grouping = *grouping;
  auto format = ParseRecordFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  options.exhaustive = flags.exhaustive;
  if (absl::Status valid = ValidMaxBucket(flags.max_bucket); !valid.ok()) {
    return Fail(kExitUsage, valid);
  }
  options.max_bucket = flags.max_bucket;
  if (!flags.memory.empty()) {
    auto memory = ParseByteSize(flags.memory);
    if (!memory.ok()) return Fail(kExitUsage, memory.status());
    if (*memory < (uint64_t{1} << 20)) {
      return Fail(kExitUsage, absl::InvalidArgumentError("--memory must be at least 1M"));
    }
    options.memory = *memory;
  }
  options.scratch_dir = flags.scratch_dir;
  if (options.scratch_dir.empty()) {
    const char* tmpdir = std::getenv("TMPDIR");
    options.scratch_dir = tmpdir != nullptr && *tmpdir != '\0' ? tmpdir : "/tmp";
  }
  options.sign.threads = ThreadCount(flags.general);

  // Standard input cannot be read twice: keep a copy when verification (an
  // LSH sweep reads the documents of candidate pairs again) or the kept
  // corpus will need a second pass, in a private new directory (mkdtemp) so
  // that no one can plant a link at its name.
  struct RemoveCopy {
    std::string dir;
    ~RemoveCopy() {
      if (dir.empty()) return;
      std::remove(absl::StrCat(dir, "/stdin").c_str());
      rmdir(dir.c_str());
    }
  } remove_copy;
  if ((WantsKept(flags) || !options.exhaustive) && ReadsStdin(flags)) {
    absl::StatusOr<std::string> dir = MakePrivateTempDir();
    if (!dir.ok()) return Fail(kExitOutput, dir.status());
    remove_copy.dir = *dir;
    input_options->stdin_copy_path = absl::StrCat(*dir, "/stdin");
  }

  auto reader = CorpusReader::Open(flags.inputs, *input_options);
  if (!reader.ok()) return Fail(kExitInput, reader.status());
  if (absl::Status checked = CheckRecordOutputs(flags, *format, **reader); !checked.ok()) {
    return Fail(kExitUsage, checked);
  }
  if (absl::Status checked = CheckKeptOptions(flags, **reader); !checked.ok()) {
    return Fail(kExitUsage, checked);
  }
  if (absl::Status checked = CheckOutputLocations(flags); !checked.ok()) {
    return Fail(absl::IsInvalidArgument(checked) ? kExitUsage : kExitOutput, checked);
  }
  Progress progress(flags.general.quiet);
  options.sign.progress = [&progress](const SignStats& stats) {
    progress.Update(SigningProgress(stats, progress.Elapsed()));
  };
  if (flags.general.verbose) {
    options.sign.on_invalid_utf8 = [](const std::string& id, uint32_t invalid) {
      std::fprintf(stderr, "kindred: note: %s: %u invalid UTF-8 sequences replaced by U+FFFD\n",
                   id.c_str(), invalid);
    };
  }
  auto result = RunSweep(**reader, options);
  progress.Clear();
  if (!result.ok()) {
    // A scratch file that cannot be written or read is a write failure (7).
    return Fail(result.status());
  }

  if (absl::Status status = WriteOutputs(flags, *result, *format, options.keep, options.grouping);
      !status.ok()) {
    return Fail(kExitOutput, status);
  }
  if (WantsKept(flags)) {
    auto kept = WriteKeptCorpus(flags, *result, **reader, *input_options);
    if (!kept.ok()) {
      return Fail(kept.status());
    }
  }
  if (!flags.general.quiet) {
    PrintSummary(*result, options);
    PrintRecordCounts(**reader);
    PrintSkips((*reader)->skips());
    PrintThroughput(result->stats.sign.documents, result->stats.sign.bytes, progress.Elapsed());
  }
  if (flags.general.verbose) {
    std::fprintf(stderr, "  time              %.2f s signing, %.2f s matching\n",
                 result->stats.sign_seconds, result->stats.match_seconds);
  }
  return kExitOk;
}

}  // namespace

void RegisterSweep(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<SweepFlags>();
  CLI::App* command = app.add_subcommand(
      "sweep", "Find the near-duplicate pairs and groups of a corpus; say what to keep and drop");
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
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, exit_code, command] {
    flags->given = OptionsGiven(command);
    *exit_code = RunSweepCommand(*flags);
  });
}

}  // namespace kindred::cli
