#include "cli/common_options.h"

#include <cstdio>

#include "absl/strings/str_cat.h"
#include "cli/output.h"
#include "cli/usage.h"
#include "kindred/candidates.h"
#include "core/parallel.h"

namespace kindred::cli {
namespace {

void AddWarcInputOptions(CLI::App* command, InputFlags* flags) {
  command
      ->add_option("--warc-id", flags->warc_id,
                   "WARC inputs: document ids from the record's uri (WARC-Target-URI) or "
                   "record-id (WARC-Record-ID)")
      ->default_str("uri")
      ->group("Input");
  command
      ->add_flag("--warc-any-status", flags->warc_any_status,
                 "WARC inputs: HTTP responses of any status are documents, not only 2xx")
      ->group("Input");
  command
      ->add_flag("--warc-strict", flags->warc_strict,
                 "WARC inputs: a payload digest mismatch or a record over --max-document-size "
                 "is an error, not counted and skipped")
      ->group("Input");
}

}  // namespace

void AddInputOptions(CLI::App* command, InputFlags* flags) {
  command
      ->add_option("--input-format", flags->format,
                   "auto (by content and name), text (a file is one document), jsonl or warc")
      ->default_str("auto")
      ->group("Input");
  command
      ->add_option("--id-field", flags->id_field,
                   "JSON Lines field holding the document id; @line uses FILE:LINE")
      ->default_str("id")
      ->group("Input");
  command
      ->add_flag("--ids-with-path", flags->ids_with_path,
                 "ids name their file, so that trees or files with the same relative paths or "
                 "ids can be read together: TREE/relative/path for a file of a tree, FILE:id "
                 "for a JSON line")
      ->group("Input");
  command
      ->add_flag("--follow-links", flags->follow_links,
                 "trees: read linked files and walk linked directories (each directory once)")
      ->group("Input");
  command
      ->add_flag("--include-binary", flags->include_binary,
                 "read binary files (a NUL byte, or over 10% of bytes not UTF-8, in the first "
                 "8 KiB) as text instead of skipping them")
      ->group("Input");
  command
      ->add_flag("--skip-unreadable", flags->skip_unreadable,
                 "skip text files that cannot be read (corrupt or truncated compression, I/O "
                 "errors, size limits), naming each, instead of failing")
      ->group("Input");
  command->add_option("--text-field", flags->text_field, "JSON Lines field holding the text")
      ->default_str("text")
      ->group("Input");
  command
      ->add_option("--max-document-size", flags->max_document_size,
                   "largest document or JSON line (K, M, G suffixes)")
      ->default_str("64M")
      ->group("Input");
  command
      ->add_option("--max-decompressed-size", flags->max_decompressed_size,
                   "largest decompressed size of one compressed input, a guard against "
                   "decompression bombs; 0 = no limit")
      ->default_str("4G")
      ->group("Input");
  AddWarcInputOptions(command, flags);
}

void AddPriorityFieldOption(CLI::App* command, InputFlags* flags, bool stored) {
  command
      ->add_option("--priority-field", flags->priority_field,
                   stored ? "JSON Lines numeric field stored in the index for "
                            "sweep --index --keep priority"
                          : "JSON Lines numeric field read by --keep priority")
      ->group("Input");
}

CLI::Option* AddInputsArgument(CLI::App* command, std::vector<std::string>* inputs) {
  return command->add_option("inputs", *inputs,
                             "directories, files (text or JSON Lines, plain, gzip or zstd), or - "
                             "for standard input");
}

absl::StatusOr<InputOptions> ToInputOptions(const InputFlags& flags, bool verbose) {
  InputOptions options;
  absl::StatusOr<InputFormat> format = ParseInputFormat(flags.format);
  if (!format.ok()) return AsOptionError(format.status());
  options.format = *format;
  absl::StatusOr<WarcIdSource> warc_id = ParseWarcIdSource(flags.warc_id);
  if (!warc_id.ok()) return AsOptionError(warc_id.status());
  options.warc.id_source = *warc_id;
  options.warc.any_status = flags.warc_any_status;
  options.warc.strict = flags.warc_strict;
  options.id_field = flags.id_field;
  options.text_field = flags.text_field;
  options.priority_field = flags.priority_field;
  options.ids_with_path = flags.ids_with_path;
  options.follow_links = flags.follow_links;
  options.include_binary = flags.include_binary;
  options.skip_unreadable = flags.skip_unreadable;
  options.on_skip = [verbose](const std::string& path, const std::string& why) {
    const bool binary = why.rfind("binary", 0) == 0;
    if (binary && !verbose) return;
    std::fprintf(stderr, "kindred: %s %s: %s\n", binary ? "note: skipped" : "skipped",
                 path.c_str(), why.c_str());
  };
  auto max_document = ParseByteSize(flags.max_document_size);
  if (!max_document.ok()) return max_document.status();
  if (*max_document == 0) return absl::InvalidArgumentError("--max-document-size must be > 0");
  options.max_document_bytes = *max_document;
  auto max_decompressed = ParseByteSize(flags.max_decompressed_size);
  if (!max_decompressed.ok()) return max_decompressed.status();
  options.max_decompressed_bytes = *max_decompressed;
  return options;
}

void AddSignatureOptions(CLI::App* command, SignatureFlags* flags) {
  command->add_option("--shingle", flags->shingle, "shingle unit: word or char")
      ->default_str("word")
      ->group("Signature");
  command->add_option("-k,--shingle-size", flags->k, "words (or characters) per shingle, 1..64")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->default_str("5")
      ->group("Signature");
  command->add_option("--perms", flags->perms, "MinHash signature length, 1..4096")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->default_str("128")
      ->group("Signature");
  command
      ->add_option("--signer", flags->signer,
                   "MinHash scheme: oph (one permutation, densified) or classic")
      ->default_str("oph")
      ->group("Signature");
  command
      ->add_option("--seed", flags->seed,
                   "hash seed of shingles and signatures (decimal, or hex after 0x)")
      ->transform(WholeNumber(0, UINT64_MAX))
      ->group("Signature");
}

absl::StatusOr<SignatureSettings> ToSignatureSettings(const SignatureFlags& flags) {
  SignatureSettings settings;
  absl::StatusOr<ShingleMode> mode = ParseShingleMode(flags.shingle);
  if (!mode.ok()) return AsOptionError(mode.status());
  settings.mode = *mode;
  absl::StatusOr<SignerScheme> scheme = ParseSignerScheme(flags.signer);
  if (!scheme.ok()) return AsOptionError(scheme.status());
  settings.scheme = *scheme;
  settings.k = flags.k;
  settings.perms = flags.perms;
  settings.seed = flags.seed;
  if (absl::Status status = settings.Validate(); !status.ok()) return status;
  return settings;
}

void AddMaxBucketOption(CLI::App* command, uint64_t* max_bucket) {
  command
      ->add_option("--max-bucket", *max_bucket,
                   "an LSH bucket (band key) shared by more documents proposes its first "
                   "document only")
      ->transform(WholeNumber(2, UINT64_MAX))
      ->default_str(std::to_string(kDefaultMaxBucket))
      ->group("Matching");
}

absl::Status ValidMaxBucket(uint64_t max_bucket) {
  return max_bucket >= 2 ? absl::OkStatus()
                         : absl::InvalidArgumentError("--max-bucket must be at least 2");
}

void AddMatchOptions(CLI::App* command, MatchFlags* flags) {
  command
      ->add_option("-t,--threshold", flags->threshold,
                   "report pairs whose exact similarity is at least this, in (0, 1]")
      ->default_str("0.8")
      ->group("Matching");
  command
      ->add_option("--bands", flags->bands,
                   "LSH bands (with --rows; default: chosen for the threshold)")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->group("Matching");
  command->add_option("--rows", flags->rows, "LSH rows per band (with --bands)")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->group("Matching");
  command
      ->add_option("--measure", flags->measure,
                   "similarity compared with the threshold: jaccard or containment")
      ->default_str("jaccard")
      ->group("Matching");
  command
      ->add_option("--min-contained-size", flags->min_contained_size,
                   "containment: report a pair only when its smaller document has at least "
                   "this many shingles")
      ->default_str(std::to_string(kDefaultMinContainedSize))
      ->group("Matching");
}

absl::StatusOr<MatchSettings> ToMatchSettings(const MatchFlags& flags,
                                              const SignatureSettings& signature) {
  MatchSettings match;
  match.threshold = flags.threshold;
  match.bands = flags.bands;
  match.rows = flags.rows;
  match.min_contained_size = flags.min_contained_size;
  absl::StatusOr<Measure> measure = ParseMeasure(flags.measure);
  if (!measure.ok()) return AsOptionError(measure.status());
  match.measure = *measure;
  if (absl::Status status = match.Validate(signature); !status.ok()) return status;
  return match;
}

void AddGeneralOptions(CLI::App* command, GeneralFlags* flags) {
  command
      ->add_option("-j,--threads", flags->threads,
                   absl::StrCat("worker threads, 1 to ", kMaxThreads, " (default: all cores)"))
      ->transform(WholeNumber(1, kMaxThreads));
  command->add_flag("-q,--quiet", flags->quiet, "no progress and no summary on stderr");
  command->add_flag("-v,--verbose", flags->verbose,
                    "also report documents with invalid UTF-8 and timings");
}

absl::Status AsOptionError(const absl::Status& status) {
  return absl::Status(status.code(), absl::StrCat("--", status.message()));
}

int ThreadCount(const GeneralFlags& flags) {
  return flags.threads > 0 ? flags.threads : DefaultThreadCount();
}

}  // namespace kindred::cli

namespace kindred::cli {

void PrintSkips(const InputSkips& skips) {
  const auto count = [](uint64_t n) { return static_cast<unsigned long long>(n); };
  if (skips.binary > 0) {
    std::fprintf(stderr, "  binary files      %llu skipped (-v names them; --include-binary reads them)\n",
                 count(skips.binary));
  }
  if (skips.unreadable > 0) {
    std::fprintf(stderr, "  unreadable files  %llu skipped (--skip-unreadable; named above)\n",
                 count(skips.unreadable));
  }
  if (skips.links > 0) {
    std::fprintf(stderr, "  symbolic links    %llu not followed (--follow-links follows them)\n",
                 count(skips.links));
  }
  if (skips.broken_links > 0 || skips.repeated_directories > 0) {
    std::fprintf(stderr, "  links skipped     %llu broken, %llu to directories already walked\n",
                 count(skips.broken_links), count(skips.repeated_directories));
  }
  if (skips.fifos + skips.sockets + skips.devices > 0) {
    std::fprintf(stderr, "  special files     %llu not read (%llu FIFOs, %llu sockets, %llu devices)\n",
                 count(skips.fifos + skips.sockets + skips.devices), count(skips.fifos),
                 count(skips.sockets), count(skips.devices));
  }
}

}  // namespace kindred::cli
