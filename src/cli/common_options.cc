#include "cli/common_options.h"

#include "absl/strings/str_cat.h"
#include "cli/output.h"
#include "cli/usage.h"
#include "kindred/candidates.h"
#include "kindred/parallel.h"

namespace kindred::cli {

void AddInputOptions(CLI::App* command, InputFlags* flags) {
  command
      ->add_option("--input-format", flags->format,
                   "auto (by content and name), text (a file is one document) or jsonl")
      ->default_str("auto")
      ->group("Input");
  command
      ->add_option("--id-field", flags->id_field,
                   "JSON Lines field holding the document id; @line uses FILE:LINE")
      ->default_str("id")
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

absl::StatusOr<InputOptions> ToInputOptions(const InputFlags& flags) {
  InputOptions options;
  if (flags.format == "auto") {
    options.format = InputFormat::kAuto;
  } else if (flags.format == "text") {
    options.format = InputFormat::kText;
  } else if (flags.format == "jsonl") {
    options.format = InputFormat::kJsonLines;
  } else {
    return absl::InvalidArgumentError(
        absl::StrCat("--input-format: expected auto, text or jsonl, not \"", flags.format, "\""));
  }
  options.id_field = flags.id_field;
  options.text_field = flags.text_field;
  options.priority_field = flags.priority_field;
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
  if (flags.shingle == "word") {
    settings.mode = ShingleMode::kWord;
  } else if (flags.shingle == "char") {
    settings.mode = ShingleMode::kChar;
  } else {
    return absl::InvalidArgumentError(
        absl::StrCat("--shingle: expected word or char, not \"", flags.shingle, "\""));
  }
  if (flags.signer == "oph") {
    settings.scheme = SignerScheme::kOnePermutation;
  } else if (flags.signer == "classic") {
    settings.scheme = SignerScheme::kClassic;
  } else {
    return absl::InvalidArgumentError(
        absl::StrCat("--signer: expected oph or classic, not \"", flags.signer, "\""));
  }
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
}

absl::StatusOr<MatchSettings> ToMatchSettings(const MatchFlags& flags,
                                              const SignatureSettings& signature) {
  MatchSettings match;
  match.threshold = flags.threshold;
  match.bands = flags.bands;
  match.rows = flags.rows;
  if (flags.measure == "jaccard") {
    match.measure = Measure::kJaccard;
  } else if (flags.measure == "containment") {
    match.measure = Measure::kContainment;
  } else {
    return absl::InvalidArgumentError(
        absl::StrCat("--measure: expected jaccard or containment, not \"", flags.measure, "\""));
  }
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

int ThreadCount(const GeneralFlags& flags) {
  return flags.threads > 0 ? flags.threads : DefaultThreadCount();
}

}  // namespace kindred::cli
