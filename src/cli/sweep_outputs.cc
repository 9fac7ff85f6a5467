// The outputs of kindred sweep: the checks made before any input is read,
// the record files and standard output, and the kept corpus.
#include <filesystem>
#include <iterator>
#include <memory>
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "cli/cli.h"
#include "cli/output.h"
#include "cli/output_checks.h"
#include "cli/sweep_flags.h"
#include "core/parallel.h"
#include "io/atomic_file.h"
#include "io/byte_stream.h"
#include "io/output_guard.h"
#include "io/warc_reader.h"
#include "kindred/errors.h"
#include "kindred/file_io.h"
#include "kindred/sweep_stages.h"

namespace kindred::cli {
namespace {

constexpr const char* kRecordNames[] = {"pairs", "groups", "decisions"};

// The record files of --output-dir never replace an input nor land inside
// an input tree, and no kept output is one of them.
absl::Status CheckRecordOutputs(const SweepFlags& flags, RecordFormat format,
                                const CorpusReader& reader) {
  if (flags.output_dir.empty()) return absl::OkStatus();
  std::vector<ResolvedInput> inputs;
  for (ResolvedInput& input : reader.ResolvedInputs()) {
    if (!input.is_stdin) inputs.push_back(std::move(input));
  }
  for (const char* name : kRecordNames) {
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

// The kept output an input needs is given: --write-kept for JSON Lines and
// WARC (`lines`), --copy-kept or --list-kept for text documents.
absl::Status CheckKeptOptionFor(const SweepFlags& flags, const ResolvedInput& input, bool lines,
                                bool warc) {
  if (lines && flags.write_kept.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(input.name,
                     warc ? " is a crawl archive: give --write-kept FILE for its kept records"
                          : " is JSON Lines: give --write-kept FILE for its kept lines",
                     " (--copy-kept and --list-kept take text documents)"));
  }
  if (!lines && flags.copy_kept.empty() && flags.list_kept.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(input.name,
                     " holds text documents: give --copy-kept DIR or --list-kept FILE for "
                     "them (--write-kept takes the kept lines of JSON Lines inputs)"));
  }
  return absl::OkStatus();
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
    if (absl::Status status = CheckKeptOptionFor(flags, input, lines, *warc); !status.ok()) {
      return status;
    }
    (lines ? needs_lines : needs_text) = true;
    if (!input.is_stdin) inputs.push_back(std::move(input));
  }
  if (!unknown && !needs_lines && !flags.write_kept.empty()) {
    return absl::InvalidArgumentError(
        "--write-kept: no input is JSON Lines (text documents take --copy-kept or --list-kept)");
  }
  if (!unknown && !needs_text && (!flags.copy_kept.empty() || !flags.list_kept.empty())) {
    return absl::InvalidArgumentError(
        absl::StrCat(flags.copy_kept.empty() ? "--list-kept" : "--copy-kept",
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
  // With --memory, a scratch file made in the scratch directory (and
  // dropped: it has no name there) before the work, not at the first spill.
  if (status.ok() && !flags.memory.empty()) {
    status = DefaultFileSystem()->CreateScratch(ScratchDirectoryOf(flags)).status();
  }
  return status;
}

// The three record kinds, formatted when wanted (all three for record
// files, else the printed one only), by the sweep's record stage.
SweepRecordParts FormatRecords(const RecordOutputs& records, const SweepResult& result) {
  const bool all = !records.output_dir.empty();
  SweepRecordOptions options;
  options.format = records.format;
  options.keep = records.keep;
  options.grouping = records.grouping;
  options.pairs = all || records.print == PrintedRecords::kPairs;
  options.groups = all || records.print == PrintedRecords::kGroups;
  options.decisions = all || records.print == PrintedRecords::kDecisions;
  options.threads = records.threads;
  std::vector<uint8_t> empty;
  if (options.decisions) {
    empty.resize(result.corpus.size());
    for (size_t doc = 0; doc < empty.size(); ++doc) {
      empty[doc] = result.corpus.shingle_count(doc) == 0;
    }
  }
  SweepRecordParts out;
  WriteSweepRecordParts(options, result.pairs, result.groups, result.corpus.ids(),
                        result.corpus.all_facts(), empty, &out);
  return out;
}

// Writes the record files: each is written and synced under its temporary
// name, the three at once on up to `threads` threads (a sync mostly waits
// for the disk), then committed in order, so that a failure leaves what
// writing them one by one would: the files before it committed, none after.
absl::Status WriteRecordFiles(const RecordOutputs& records, const SweepRecordParts& formatted) {
  std::error_code error;
  std::filesystem::create_directories(records.output_dir, error);
  if (error) {
    return WriteFailed(
        absl::StrCat("cannot create output directory ", records.output_dir, ": ", error.message()));
  }
  const RecordParts* data[] = {&formatted.pairs, &formatted.groups, &formatted.decisions};
  constexpr size_t kFiles = std::size(kRecordNames);
  std::string paths[kFiles];
  std::unique_ptr<io::AtomicFile> files[kFiles];
  absl::Status written[kFiles];
  for (size_t k = 0; k < kFiles; ++k) {
    paths[k] = absl::StrCat(records.output_dir, "/", kRecordNames[k], ".",
                            RecordFormatSuffix(records.format));
  }
  ParallelFor(kFiles, records.threads, [&](size_t begin, size_t end, int) {
    for (size_t k = begin; k < end; ++k) {
      auto file = io::AtomicFile::Create(paths[k], DefaultFileSystem());
      written[k] = file.status();
      if (!file.ok()) continue;
      files[k] = *std::move(file);
      for (const std::string& part : *data[k]) {
        if (written[k].ok()) written[k] = files[k]->Append(part);
      }
      if (written[k].ok()) written[k] = files[k]->Sync();
    }
  });
  for (size_t k = 0; k < kFiles; ++k) {
    absl::Status status = written[k].ok() ? files[k]->Commit() : written[k];
    if (!status.ok()) return Annotate(status, absl::StrCat("cannot write ", paths[k]));
  }
  return absl::OkStatus();
}

absl::Status PrintParts(const RecordParts& parts) {
  for (const std::string& part : parts) {
    if (absl::Status status = WriteOutputFile("-", part); !status.ok()) return status;
  }
  return absl::OkStatus();
}

}  // namespace

bool WantsKept(const SweepFlags& flags) {
  return !flags.write_kept.empty() || !flags.copy_kept.empty() || !flags.list_kept.empty();
}

int CheckSweepOutputs(const SweepFlags& flags, const RecordOutputs& records,
                      const CorpusReader& reader) {
  if (absl::Status checked = CheckRecordOutputs(flags, records.format, reader); !checked.ok()) {
    return Fail(kExitUsage, checked);
  }
  if (absl::Status checked = CheckKeptOptions(flags, reader); !checked.ok()) {
    return Fail(kExitUsage, checked);
  }
  if (absl::Status checked = CheckOutputLocations(flags); !checked.ok()) {
    return Fail(absl::IsInvalidArgument(checked) ? kExitUsage : kExitOutput, checked);
  }
  return kExitOk;
}

absl::Status WriteRecordOutputs(const RecordOutputs& records, const SweepResult& result) {
  const SweepRecordParts formatted = FormatRecords(records, result);
  if (!records.output_dir.empty()) {
    if (absl::Status status = WriteRecordFiles(records, formatted); !status.ok()) return status;
  }
  switch (records.print) {
    case PrintedRecords::kPairs:
      return PrintParts(formatted.pairs);
    case PrintedRecords::kGroups:
      return PrintParts(formatted.groups);
    case PrintedRecords::kDecisions:
      return PrintParts(formatted.decisions);
    case PrintedRecords::kNone:
      break;
  }
  return absl::OkStatus();
}

int WriteKeptOutputs(const SweepFlags& flags, const SweepResult& result, const CorpusReader& reader,
                     const InputOptions& input_options) {
  if (!WantsKept(flags)) return kExitOk;
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
  absl::StatusOr<KeptCounts> kept = WriteKept(request);
  if (!kept.ok()) {
    return Fail(kept.status());
  }
  return kExitOk;
}

}  // namespace kindred::cli
