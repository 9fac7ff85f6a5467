// kindred build: make an index file from a corpus.
#include <cstdio>

#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/output.h"
#include "kindred/banding.h"
#include "kindred/index_writer.h"
#include "kindred/signed_corpus.h"
#include "kindred/text.h"

namespace kindred::cli {
namespace {

struct BuildFlags {
  std::string index;
  std::vector<std::string> inputs;
  InputFlags input;
  SignatureFlags signature;
  MatchFlags match;
  GeneralFlags general;
};

// Exit code of a failed index write: the file system's refusals are output
// failures (7); the rest keep their usual meaning.
int WriteExitCode(const absl::Status& status) {
  switch (status.code()) {
    case absl::StatusCode::kResourceExhausted:
    case absl::StatusCode::kAborted:
    case absl::StatusCode::kPermissionDenied:
      return kExitOutput;
    case absl::StatusCode::kAlreadyExists:
      return kExitUsage;
    default:
      return ExitCodeFor(status);
  }
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
  Banding banding = match->bands != 0 ? Banding{match->bands, match->rows}
                                      : ChooseBanding(match->threshold, settings.signature.perms);
  settings.bands = banding.bands;
  settings.rows = banding.rows;
  settings.unicode_version = UnicodeVersionString();
  return settings;
}

int RunBuild(const BuildFlags& flags) {
  auto settings = ToIndexSettings(flags);
  if (!settings.ok()) return Fail(kExitUsage, settings.status());
  auto input_options = ToInputOptions(flags.input);
  if (!input_options.ok()) return Fail(kExitUsage, input_options.status());
  if (DefaultFileSystem()->Exists(flags.index)) {
    return Fail(kExitUsage,
                absl::AlreadyExistsError(absl::StrFormat(
                    "index %s already exists (kindred add appends to it)", flags.index)));
  }
  auto reader = CorpusReader::Open(flags.inputs, *input_options);
  if (!reader.ok()) return Fail(kExitInput, reader.status());
  SignOptions sign;
  sign.threads = ThreadCount(flags.general);
  Progress progress(flags.general.quiet);
  sign.progress = [&progress](const SignStats& stats) {
    progress.Update(SigningProgress(stats, progress.Elapsed()));
  };
  SignedCorpus corpus(settings->signature.perms);
  SignStats stats;
  absl::Status signed_status = SignCorpus(**reader, settings->signature, sign, &corpus, &stats);
  progress.Clear();
  if (!signed_status.ok()) return Fail(signed_status);
  absl::Status created = CreateIndex(flags.index, *settings, corpus);
  if (!created.ok()) return Fail(WriteExitCode(created), created);
  if (!flags.general.quiet) {
    std::fprintf(stderr, "kindred build: %s: %llu documents (%llu empty), %s, %u bands x %u rows\n",
                 flags.index.c_str(), static_cast<unsigned long long>(stats.documents),
                 static_cast<unsigned long long>(stats.empty_documents),
                 settings->signature.ToString().c_str(), settings->bands, settings->rows);
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
  AddInputOptions(command, &flags->input);
  AddSignatureOptions(command, &flags->signature);
  AddMatchOptions(command, &flags->match);
  AddGeneralOptions(command, &flags->general);
  command->callback([flags, exit_code] { *exit_code = RunBuild(*flags); });
}

}  // namespace kindred::cli
