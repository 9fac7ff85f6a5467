// kindred compact: merge an index's segments into one, dropping replaced
// documents, atomically (a crash leaves the old file intact).
#include <cstdio>

#include "cli/cli.h"
#include "cli/index_options.h"
#include "cli/output.h"
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
  std::string memory;
  std::string scratch_dir;
};

int RunCompact(const CompactFlags& flags) {
  ReportStaleTempFiles(flags.index);
  if (flags.wait_lock < 0) {
    return Fail(kExitUsage, absl::InvalidArgumentError("--wait-lock must be 0 or more seconds"));
  }
  IndexWriteOptions options;
  options.lock_wait_seconds = flags.wait_lock;
  CompactOptions compact{flags.bands, flags.rows};
  if (!flags.memory.empty()) {
    auto memory = ParseByteSize(flags.memory);
    if (!memory.ok()) return Fail(kExitUsage, memory.status());
    compact.memory = *memory;
  }
  compact.scratch_dir = flags.scratch_dir;
  auto result = CompactIndex(flags.index, compact, options);
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
    if (result->scratch_runs > 0) {
      std::fprintf(stderr, "  band keys sorted in %s under --memory\n",
                   Counted(result->scratch_runs, "run").c_str());
    }
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
  command
      ->add_option("--memory", flags->memory,
                   "bound on the band keys held in memory while they are sorted, e.g. 1G (at "
                   "least 4M is used): sorted runs go to the scratch directory; the new file is "
                   "the same bytes (default: no bound)")
      ->group("Resources");
  command
      ->add_option("--scratch-dir", flags->scratch_dir,
                   "directory for the sorted runs (default: the index's directory); the file is "
                   "removed at once and vanishes when kindred exits")
      ->group("Resources");
  AddWaitLockOption(command, &flags->wait_lock);
  command->add_flag("-q,--quiet", flags->quiet, "no summary on stderr");
  command->callback([flags, exit_code] { *exit_code = RunCompact(*flags); });
}

}  // namespace kindred::cli
