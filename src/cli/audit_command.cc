// kindred audit: verify every checksum and structural invariant of an
// index and say exactly what is wrong. Exit status 0 when sound (a torn tail
// is reported but is not damage), 4 when anything is wrong.
#include <cstdio>

#include "cli/cli.h"
#include "core/plural.h"
#include "kindred/index_writer.h"

namespace kindred::cli {
namespace {

struct AuditFlags {
  std::string index;
  bool repair = false;
  bool quiet = false;
};

int RunAudit(const AuditFlags& flags) {
  if (flags.repair) {
    auto cut = RepairIndex(flags.index);
    if (!cut.ok()) return Fail(cut.status());
    if (!flags.quiet) {
      std::fprintf(stderr, "kindred audit: cut a torn tail of %s\n", Counted(*cut, "byte").c_str());
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
  command->add_flag("--repair", flags->repair, "first cut off a torn tail (takes the writer lock)");
  command->add_flag("-q,--quiet", flags->quiet, "print problems only");
  command->callback([flags, exit_code] { *exit_code = RunAudit(*flags); });
}

}  // namespace kindred::cli
