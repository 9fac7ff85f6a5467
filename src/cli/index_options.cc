#include "cli/index_options.h"

#include <cstdio>

#include "absl/strings/str_cat.h"
#include "cli/cli.h"
#include "core/plural.h"
#include "kindred/banding.h"
#include "kindred/errors.h"
#include "kindred/index_query.h"
#include "kindred/shingles.h"
#include "kindred/temp_files.h"

namespace kindred::cli {

GivenOptions OptionsGiven(CLI::App* command) {
  GivenOptions given;
  for (const char* name : {"--shingle", "--shingle-size", "--perms", "--signer", "--seed"}) {
    given.signature |= command->count(name) > 0;
  }
  given.threshold = command->count("--threshold") > 0;
  given.measure = command->count("--measure") > 0;
  return given;
}

absl::Status CheckIndexSignature(const SignatureFlags& flags, const GivenOptions& given,
                                 const IndexReader& reader) {
  SignatureSettings wanted = reader.settings().signature;
  if (given.signature) {
    auto parsed = ToSignatureSettings(flags);
    if (!parsed.ok()) return parsed.status();
    wanted = *parsed;
  }
  std::vector<std::string> warnings;
  absl::Status status =
      CheckIndexSettings(reader.settings(), wanted, UnicodeVersionString(), &warnings);
  for (const std::string& warning : warnings) {
    std::fprintf(stderr, "kindred: warning: %s\n", warning.c_str());
  }
  if (status.ok()) return status;
  return Annotate(status, absl::StrCat("index ", reader.path()));
}

absl::StatusOr<MatchSettings> IndexQueryMatch(const MatchFlags& flags, const GivenOptions& given,
                                              IndexReader* reader) {
  QueryRequest request;
  if (given.threshold) request.threshold = flags.threshold;
  if (given.measure) {
    auto measure = ParseMeasure(flags.measure);
    if (!measure.ok()) return AsOptionError(measure.status());
    request.measure = *measure;
  }
  request.bands = flags.bands;
  request.rows = flags.rows;
  request.min_contained_size = flags.min_contained_size;
  auto match = ResolveQueryMatch(reader->settings(), request);
  if (!match.ok()) return match.status();
  if (NeedsOtherBanding(reader->settings(), *match)) {
    if (absl::Status status = reader->UseBanding(match->bands, match->rows); !status.ok()) {
      return status;
    }
  }
  return match;
}

int PrepareIndexQuery(const SignatureFlags& signature, const MatchFlags& match_flags,
                      const GivenOptions& given, IndexReader* reader, MatchSettings* match) {
  if (absl::Status status = CheckIndexSignature(signature, given, *reader); !status.ok()) {
    return Fail(absl::IsFailedPrecondition(status) ? kExitIndexMismatch : kExitUsage, status);
  }
  auto settings = IndexQueryMatch(match_flags, given, reader);
  if (!settings.ok()) return Fail(kExitUsage, settings.status());
  *match = *settings;
  return kExitOk;
}

absl::Status SignInputs(const std::vector<std::string>& inputs, const InputOptions& input_options,
                        const SignatureSettings& signature, int threads, SignedCorpus* out,
                        SignStats* stats) {
  auto reader = CorpusReader::Open(inputs, input_options);
  if (!reader.ok()) return reader.status();
  SignOptions sign;
  sign.threads = threads;
  return SignCorpus(**reader, signature, sign, out, stats);
}

void PrintCrowdedKeys(uint64_t crowded, uint64_t max_bucket) {
  if (crowded == 0) return;
  std::fprintf(stderr,
               "  crowded keys      %s shared by more than %llu indexed documents "
               "proposed their first document only (--max-bucket)\n",
               Counted(crowded, "band key").c_str(),
               static_cast<unsigned long long>(max_bucket));
}

void ReportStaleTempFiles(const std::string& index) {
  for (const std::string& line : RemoveStaleTempFiles(index)) {
    std::fprintf(stderr, "kindred: %s\n", line.c_str());
  }
}

std::unique_ptr<IndexWriter> OpenIndexForWriting(const std::string& index, double wait_lock,
                                                 bool quiet, int* exit_code) {
  ReportStaleTempFiles(index);
  IndexWriteOptions options;
  options.lock_wait_seconds = wait_lock;
  auto writer = IndexWriter::Open(index, options);
  if (!writer.ok()) {
    *exit_code = Fail(writer.status());
    return nullptr;
  }
  if ((*writer)->torn_tail_cut() > 0 && !quiet) {
    std::fprintf(stderr, "kindred: cut a torn tail of %s off %s\n",
                 Counted((*writer)->torn_tail_cut(), "byte").c_str(), index.c_str());
  }
  return std::move(*writer);
}

}  // namespace kindred::cli
