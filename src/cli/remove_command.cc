// kindred remove: retire documents of an index by id (a takedown without a
// rebuild), in one new segment that holds only the retired list.
#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_split.h"
#include "cli/cli.h"
#include "cli/index_options.h"
#include "core/plural.h"
#include "kindred/file_io.h"
#include "kindred/index_writer.h"

namespace kindred::cli {
namespace {

struct RemoveFlags {
  std::string index;
  std::vector<std::string> ids;
  std::string ids_from;
  double wait_lock = 0;
  bool quiet = false;
};

// One id per line; empty lines are skipped, a trailing CR is dropped.
absl::Status ReadIds(const std::string& path, std::vector<std::string>* ids) {
  auto file = DefaultFileSystem()->OpenRead(path);
  if (!file.ok()) return absl::NotFoundError(absl::StrCat("cannot open ", path));
  absl::StatusOr<std::string> content = ReadToEnd(**file);
  if (!content.ok()) return absl::DataLossError(absl::StrCat("cannot read ", path));
  for (absl::string_view line : absl::StrSplit(*content, '\n')) {
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    if (!line.empty()) ids->emplace_back(line);
  }
  return absl::OkStatus();
}

// Exit code of a failed retirement: an id the index does not hold is an
// input error (3); the rest as for every index write.
int WriteExitCode(const absl::Status& status) {
  return absl::IsNotFound(status) ? kExitInput : ExitCodeFor(status);
}

int RunRemove(const RemoveFlags& flags) {
  std::vector<std::string> ids = flags.ids;
  if (!flags.ids_from.empty()) {
    if (absl::Status read = ReadIds(flags.ids_from, &ids); !read.ok()) {
      return Fail(kExitInput, read);
    }
  }
  if (ids.empty()) {
    return Fail(kExitUsage, absl::InvalidArgumentError("give ids to remove, or --ids-from FILE"));
  }
  if (flags.wait_lock < 0) {
    return Fail(kExitUsage, absl::InvalidArgumentError("--wait-lock must be 0 or more seconds"));
  }
  int exit_code = kExitOk;
  std::unique_ptr<IndexWriter> writer =
      OpenIndexForWriting(flags.index, flags.wait_lock, flags.quiet, &exit_code);
  if (writer == nullptr) return exit_code;
  auto retired = writer->Retire(ids);
  if (!retired.ok()) return Fail(WriteExitCode(retired.status()), retired.status());
  if (!flags.quiet) {
    const uint32_t live = writer->reader().live_count();
    std::fprintf(stderr, "kindred remove: %s: %u %s retired (segment %u); %u %s live\n",
                 flags.index.c_str(), retired->retired,
                 retired->retired == 1 ? "document" : "documents", retired->segment_number, live,
                 live == 1 ? "document" : "documents");
  }
  return kExitOk;
}

}  // namespace

void AddWaitLockOption(CLI::App* command, double* seconds) {
  command->add_option("--wait-lock", *seconds,
                      "wait up to this many seconds for another writer's lock (default 0: fail "
                      "at once with exit code 6)");
}

void RegisterRemove(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<RemoveFlags>();
  CLI::App* command = app.add_subcommand(
      "remove",
      "Retire documents of an index by id, in a new segment (compact drops them for good)");
  command->add_option("index", flags->index, "the index file")->required();
  command->add_option("ids", flags->ids, "ids of the documents to retire");
  command->add_option("--ids-from", flags->ids_from, "read ids from this file, one per line");
  AddWaitLockOption(command, &flags->wait_lock);
  command->add_flag("-q,--quiet", flags->quiet, "no summary on stderr");
  command->callback([flags, exit_code] { *exit_code = RunRemove(*flags); });
}

}  // namespace kindred::cli
