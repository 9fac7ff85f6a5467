// kindred: find near-duplicate text documents.
#include <cstdio>

#include "cli/cli.h"
#include "cli/huge_pages.h"
#include "cli/usage.h"
#include "kindred/temp_files.h"

namespace kindred::cli {

int Fail(int exit_code, const absl::Status& status) {
  // Usage errors name the command ("kindred: sweep: ..."), as parse errors do.
  const std::string prefix = exit_code == kExitUsage ? UsagePrefix() : "kindred: ";
  std::fprintf(stderr, "%s%s\n", prefix.c_str(), std::string(status.message()).c_str());
  return exit_code;
}

int Fail(const absl::Status& status) { return Fail(ExitCodeFor(status), status); }

}  // namespace kindred::cli

int main(int argc, char** argv) {
  using namespace kindred::cli;
  StartWithHugePages(argc, argv);
  CLI::App app{"kindred: find near-duplicate text documents", "kindred"};
  app.failure_message(ParseErrorMessage);
  app.require_subcommand(1);
  app.set_version_flag("--version", "kindred 0.1.0");
  int exit_code = kExitOk;
  kindred::InstallTempFileCleanup();  // SIGINT/SIGTERM remove INDEX.tmp.PID etc.
  RegisterSweep(app, &exit_code);
  RegisterPlan(app, &exit_code);
  RegisterBuild(app, &exit_code);
  RegisterAdd(app, &exit_code);
  RegisterCheck(app, &exit_code);
  RegisterInfo(app, &exit_code);
  RegisterAudit(app, &exit_code);
  RegisterCompact(app, &exit_code);
  RegisterTune(app, &exit_code);
  RegisterExplain(app, &exit_code);
  RegisterServe(app, &exit_code);
  RegisterRemove(app, &exit_code);
  if (!FindCommandName(app, argc, argv)) return kExitUsage;
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    int code = app.exit(e);
    return code == 0 ? kExitOk : kExitUsage;
  }
  return exit_code;
}
