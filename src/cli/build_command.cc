// kindred build: make an index file from a corpus.
#include <unistd.h>

#include <cstdio>

#include "absl/cleanup/cleanup.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/record_counts.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/index_options.h"
#include "cli/output.h"
#include "cli/output_checks.h"
#include "core/plural.h"
#include "kindred/banding.h"
#include "kindred/index_writer.h"
#include "kindred/signed_corpus.h"
#include "kindred/temp_files.h"
#include "kindred/text.h"

namespace kindred::cli {
namespace {

struct BuildFlags {
  std::string index;
  std::vector<std::string> inputs;
  std::string memory;
  InputFlags input;
  SignatureFlags signature;
  MatchFlags match;
  GeneralFlags general;
};

// Exit code of a failed build: an index file that already exists is a usage
// error (2); the rest as for every index write.
int WriteExitCode(const absl::Status& status) {
  return absl::IsAlreadyExists(status) ? kExitUsage : ExitCodeFor(status);
}

absl::StatusOr<IndexSettings> ToIndexSettings(const BuildFlags& flags) {
  IndexSettings settings;
  auto signature = ToSignatureSettings(flags.signature);
  if (!signature.ok()) return signature.status();
  settings.signature = *signature;
  auto match = ToMatchSettings(flags.match, settings.signature);
  if (!match.ok()) return match.status();
  settings.threshold = match->threshold;
  settings.measure = match->measure;
  const Banding banding = ResolveBanding(*match, settings.signature.perms);
  settings.bands = banding.bands;
  settings.rows = banding.rows;
  // An index built for containment stores the containment search's keys.
  if (match->measure == Measure::kContainment) {
    settings.containment = ContainmentKeysFor(match->threshold, match->min_contained_size);
  }
  settings.unicode_version = UnicodeVersionString();
  return settings;
}

// The whole corpus in memory, written as one segment. *write_error says
// whether a failure came from writing (else from reading and signing).
absl::Status BuildWhole(const std::string& index, const IndexSettings& settings,
                        CorpusReader& reader, const SignOptions& sign, SignStats* stats,
                        bool* write_error) {
  SignedCorpus corpus(settings.signature.perms);
  if (absl::Status status = SignCorpus(reader, settings.signature, sign, &corpus, stats);
      !status.ok()) {
    return status;
  }
  *write_error = true;
  return CreateIndex(index, settings, corpus);
}

// Under a memory budget: the corpus is signed in parts of about a quarter
// of the budget (a part is encoded whole before it is written, and the
// index's own tables grow), each appended as a segment of a file beside
// the index ("<index>.building.<pid>") that is renamed to the index only
// when complete (never over an existing file); on failure it is removed.
absl::Status BuildInParts(const std::string& index, const IndexSettings& settings, uint64_t memory,
                          CorpusReader& reader, SignOptions sign, SignStats* stats,
                          bool* write_error) {
  FileSystem* fs = DefaultFileSystem();
  const std::string partial = absl::StrCat(index, ".building.", getpid());
  *write_error = true;
  absl::Status status = CreateIndex(partial, settings, SignedCorpus(settings.signature.perms));
  if (!status.ok()) return status;
  RegisterTempFile(partial);
  absl::Cleanup forget = [&partial] { ForgetTempFile(partial); };
  {
    auto writer = IndexWriter::Open(partial);
    if (!writer.ok()) {
      fs->Remove(partial).IgnoreError();
      return writer.status();
    }
    bool append_failed = false;
    auto append = [&writer, &append_failed](const SignedCorpus& part) {
      absl::Status appended = (*writer)->Append(part, DuplicateIdPolicy::kError).status();
      append_failed = !appended.ok();
      return appended;
    };
    sign.flush = append;
    sign.flush_bytes = memory / 4;
    SignedCorpus corpus(settings.signature.perms);
    status = SignCorpus(reader, settings.signature, sign, &corpus, stats);
    if (status.ok() && corpus.size() > 0) status = append(corpus);
    // A repeated id across parts is found by Append: an input error too.
    *write_error = append_failed && !absl::IsInvalidArgument(status);
    if (!status.ok()) {
      fs->Remove(partial).IgnoreError();
      return status;
    }
  }
  *write_error = true;
  if (status.ok()) status = fs->Rename(partial, index, /*replace=*/false);
  if (status.ok()) status = fs->SyncDirectoryOf(index);
  if (!status.ok()) fs->Remove(partial).IgnoreError();
  return status;
}

int RunBuild(const BuildFlags& flags) {
  auto settings = ToIndexSettings(flags);
  if (!settings.ok()) return Fail(kExitUsage, settings.status());
  auto input_options = ToInputOptions(flags.input, flags.general.verbose);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  if (DefaultFileSystem()->Exists(flags.index)) {
    if (auto existing = IndexReader::Open(flags.index); absl::IsDataLoss(existing.status())) {
      return Fail(kExitIndexCorrupt,
                  absl::DataLossError(absl::StrCat(existing.status().message(),
                                                   "; the index is damaged and build never "
                                                   "writes over it (see kindred audit --repair)")));
    }
    return Fail(kExitUsage,
                absl::AlreadyExistsError(absl::StrFormat(
                    "index %s already exists (kindred add appends to it)", flags.index)));
  }
  ReportStaleTempFiles(flags.index);
  if (absl::Status s = CheckOutputFile(flags.index); !s.ok()) return Fail(kExitOutput, s);
  auto reader = CorpusReader::Open(flags.inputs, *input_options);
  if (!reader.ok()) return Fail(kExitInput, reader.status());
  SignOptions sign;
  sign.threads = ThreadCount(flags.general);
  Progress progress(flags.general.quiet);
  sign.progress = [&progress](const SignStats& stats) {
    progress.Update(SigningProgress(stats, progress.Elapsed()));
  };
  uint64_t memory = 0;
  if (!flags.memory.empty()) {
    auto parsed = ParseByteSize(flags.memory);
    if (!parsed.ok()) return Fail(kExitUsage, parsed.status());
    memory = *parsed;
  }
  SignStats stats;
  bool write_error = false;
  absl::Status built =
      memory == 0
          ? BuildWhole(flags.index, *settings, **reader, sign, &stats, &write_error)
          : BuildInParts(flags.index, *settings, memory, **reader, sign, &stats, &write_error);
  progress.Clear();
  if (!built.ok()) return write_error ? Fail(WriteExitCode(built), built) : Fail(built);
  if (!flags.general.quiet) {
    std::fprintf(stderr, "kindred build: %s: %s (%llu empty), %s, %s\n", flags.index.c_str(),
                 Counted(stats.documents, "document").c_str(),
                 static_cast<unsigned long long>(stats.empty_documents),
                 settings->signature.ToString().c_str(),
                 BandsByRows(settings->bands, settings->rows).c_str());
    PrintHtmlPages(stats);
    PrintRecordCounts(**reader);
    PrintSkips((*reader)->skips());
    PrintThroughput(stats.documents, stats.bytes, progress.Elapsed());
  }
  return kExitOk;
}

}  // namespace

void RegisterBuild(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<BuildFlags>();
  CLI::App* command = app.add_subcommand(
      "build", "Make an index file from a corpus (the signature settings are stored in it)");
  command->add_option("index", flags->index, "the index file to create (must not exist)")
      ->required();
  AddInputsArgument(command, &flags->inputs)->required();
  command
      ->add_option(
          "--memory", flags->memory,
          "bound on the signed data held before writing, e.g. 4G: sign and write the corpus "
          "in parts of about a quarter of it (signatures and shingle sets), one segment each "
          "(default: the whole corpus at once, one segment)")
      ->group("Resources");
  AddInputOptions(command, &flags->input);
  AddPriorityFieldOption(command, &flags->input, /*stored=*/true);
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, exit_code] { *exit_code = RunBuild(*flags); });
}

}  // namespace kindred::cli
