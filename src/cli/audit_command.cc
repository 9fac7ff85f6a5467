// kindred audit: verify every checksum and structural invariant of an
// index and say exactly what is wrong. Exit status 0 when sound (a torn tail
// is reported but is not damage), 4 when anything is wrong.
#include <cstdio>

#include "cli/cli.h"
#include "cli/index_options.h"
#include "core/plural.h"
#include "kindred/index_writer.h"

namespace kindred::cli {
namespace {

struct AuditFlags {
  std::string index;
  bool repair = false;
  double wait_lock = 0;
  bool quiet = false;
};

int RunAudit(const AuditFlags& flags) {
  ReportStaleTempFiles(flags.index);
  if (flags.repair) {
    if (flags.wait_lock < 0) {
      return Fail(kExitUsage, absl::InvalidArgumentError("--wait-lock must be 0 or more seconds"));
    }
    IndexWriteOptions options;
    options.lock_wait_seconds = flags.wait_lock;
    auto repair = RepairIndex(flags.index, options);
    if (absl::IsAlreadyExists(repair.status())) return Fail(kExitOutput, repair.status());
    if (!repair.ok()) return Fail(repair.status());
    if (repair->torn_tail_cut > 0 && !flags.quiet) {
      std::fprintf(stderr, "kindred audit: cut a torn tail of %s (after the last recorded commit)\n",
                   Counted(repair->torn_tail_cut, "byte").c_str());
    }
    if (!repair->repaired_path.empty()) {
      for (const std::string& lost : repair->lost) std::printf("lost: %s\n", lost.c_str());
      std::fprintf(stderr,
                   "kindred audit: %s was left exactly as it is; wrote %s with its %s "
                   "(%s lost; see the \"lost:\" lines)\n",
                   flags.index.c_str(), repair->repaired_path.c_str(),
                   Counted(repair->documents_kept, "readable live document").c_str(),
                   Counted(repair->lost.size(), "item").c_str());
    }
  }
  auto report = AuditIndex(flags.index);
  if (!report.ok()) return Fail(report.status());
  for (const std::string& note : report->notes) std::printf("note: %s\n", note.c_str());
  for (const std::string& problem : report->problems) std::printf("problem: %s\n", problem.c_str());
  if (!report->ok()) {
    std::fprintf(stderr, "kindred audit: %s: %s\n", flags.index.c_str(),
                 Counted(report->problems.size(), "problem").c_str());
    return kExitIndexCorrupt;
  }
  if (!flags.quiet) {
    std::fprintf(stderr,
                 "kindred audit: %s: ok (%s, %s; every checksum, shingle "
                 "set, signature and band key verified)\n",
                 flags.index.c_str(), Counted(report->segments, "segment").c_str(),
                 Counted(report->documents, "document").c_str());
  }
  return kExitOk;
}

}  // namespace

void RegisterAudit(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<AuditFlags>();
  CLI::App* command =
      app.add_subcommand("audit", "Verify every checksum and invariant of an index");
  command->add_option("index", flags->index, "the index file")->required();
  command->add_flag("--repair", flags->repair,
                    "first cut off a torn tail after the last recorded commit, or, when the "
                    "index is damaged, write its readable documents to INDEX.repaired.kin "
                    "(the index is never cut; takes the writer lock)");
  AddWaitLockOption(command, &flags->wait_lock);
  command->add_flag("-q,--quiet", flags->quiet, "print problems only");
  command->callback([flags, exit_code] { *exit_code = RunAudit(*flags); });
}

}  // namespace kindred::cli
