// Options shared by the commands that read a corpus (sweep, build, add, check,
// tune, explain): how to read inputs, how to sign, how to match, threads.
// Each Add*Options function registers the options on a subcommand and binds
// them to a flags struct; the To* functions validate and convert.
#ifndef KINDRED_CLI_COMMON_OPTIONS_H_
#define KINDRED_CLI_COMMON_OPTIONS_H_

#include <string>
#include <vector>

#include "CLI/CLI.hpp"
#include "absl/status/statusor.h"
#include "kindred/corpus.h"
#include "kindred/settings.h"

namespace kindred::cli {

struct InputFlags {
  std::string format = "auto";
  std::string id_field = "id";
  std::string text_field = "text";
  std::string priority_field;
  bool ids_with_path = false;
  bool follow_links = false;
  bool include_binary = false;
  bool skip_unreadable = false;
  std::string max_document_size = "64M";
  std::string max_decompressed_size = "4G";
  std::string warc_id = "uri";
  bool warc_any_status = false;
  bool warc_strict = false;
};
void AddInputOptions(CLI::App* command, InputFlags* flags);
// --priority-field: only for sweep (read by --keep priority) and for the
// commands that store it in an index (`stored`: build, add) for a later
// sweep --index --keep priority.
void AddPriorityFieldOption(CLI::App* command, InputFlags* flags, bool stored);
// The positional corpus inputs (directories, files, "-"); returns the option
// so a command can make it required.
CLI::Option* AddInputsArgument(CLI::App* command, std::vector<std::string>* inputs);
// Validates and converts. Files skipped as unreadable are named on stderr
// ("kindred: skipped PATH: why"); binary files only when `verbose`.
absl::StatusOr<InputOptions> ToInputOptions(const InputFlags& flags, bool verbose = false);
// The summary lines of what the reading skipped (nothing when it skipped
// nothing), on stderr.
void PrintSkips(const InputSkips& skips);

struct SignatureFlags {
  std::string shingle = "word";
  uint32_t k = 5;
  uint32_t perms = 128;
  std::string signer = "oph";
  uint64_t seed = kDefaultSeed;
};
void AddSignatureOptions(CLI::App* command, SignatureFlags* flags);
absl::StatusOr<SignatureSettings> ToSignatureSettings(const SignatureFlags& flags);

struct MatchFlags {
  double threshold = 0.8;
  uint32_t bands = 0;
  uint32_t rows = 0;
  std::string measure = "jaccard";
  uint32_t min_contained_size = kDefaultMinContainedSize;
};
void AddMatchOptions(CLI::App* command, MatchFlags* flags);
absl::StatusOr<MatchSettings> ToMatchSettings(const MatchFlags& flags,
                                              const SignatureSettings& signature);

struct GeneralFlags {
  int threads = 0;  // 0: all cores
  bool quiet = false;
  bool verbose = false;
};
void AddGeneralOptions(CLI::App* command, GeneralFlags* flags);

// --max-bucket (sweep, check, add): the crowded-bucket cap of candidates.h,
// at least 2 (ValidMaxBucket says so otherwise: a usage error).
void AddMaxBucketOption(CLI::App* command, uint64_t* max_bucket);
absl::Status ValidMaxBucket(uint64_t max_bucket);
int ThreadCount(const GeneralFlags& flags);

// A library's error for a name it does not know, which names the setting as
// its option is named ("shingle: expected word or char, not \"x\""), as the
// option's error ("--shingle: ...").
absl::Status AsOptionError(const absl::Status& status);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_COMMON_OPTIONS_H_
