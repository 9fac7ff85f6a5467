// kindred compact: merge an index's segments into one, dropping replaced
// documents, atomically (a crash leaves the old file intact).
#include <cstdio>

#include "cli/cli.h"
#include "cli/index_options.h"
#include "cli/usage.h"
#include "core/plural.h"
#include "kindred/index_writer.h"

namespace kindred::cli {
namespace {

struct CompactFlags {
  std::string index;
  uint32_t bands = 0;
  uint32_t rows = 0;
  double wait_lock = 0;
  bool quiet = false;
};

int RunCompact(const CompactFlags& flags) {
  ReportStaleTempFiles(flags.index);
  if (flags.wait_lock < 0) {
    return Fail(kExitUsage, absl::InvalidArgumentError("--wait-lock must be 0 or more seconds"));
  }
  IndexWriteOptions options;
  options.lock_wait_seconds = flags.wait_lock;
  auto result = CompactIndex(flags.index, CompactOptions{flags.bands, flags.rows}, options);
  if (!result.ok()) {
    // Its invalid arguments are the --bands and --rows given.
    const absl::Status& status = result.status();
    return Fail(absl::IsInvalidArgument(status) ? kExitUsage : ExitCodeFor(status), status);
  }
  if (!flags.quiet) {
    std::fprintf(stderr, "kindred compact: %s: %s, %s -> 1 segment, %s; %llu -> %llu bytes\n",
                 flags.index.c_str(), Counted(result->segments_before, "segment").c_str(),
                 Counted(result->documents_before, "document").c_str(),
                 Counted(result->documents_after, "document").c_str(),
                 static_cast<unsigned long long>(result->bytes_before),
                 static_cast<unsigned long long>(result->bytes_after));
  }
  return kExitOk;
}

}  // namespace

void RegisterCompact(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<CompactFlags>();
  CLI::App* command = app.add_subcommand(
      "compact", "Merge an index's segments into one, dropping replaced documents");
  command->add_option("index", flags->index, "the index file")->required();
  command->add_option("--bands", flags->bands, "store band keys for this many bands (with --rows)")
      ->transform(WholeNumber(0, UINT32_MAX));
  command->add_option("--rows", flags->rows, "rows per band of the stored band keys")
      ->transform(WholeNumber(0, UINT32_MAX));
  AddWaitLockOption(command, &flags->wait_lock);
  command->add_flag("-q,--quiet", flags->quiet, "no summary on stderr");
  command->callback([flags, exit_code] { *exit_code = RunCompact(*flags); });
}

}  // namespace kindred::cli
