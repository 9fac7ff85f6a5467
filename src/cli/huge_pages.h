#ifndef KINDRED_CLI_HUGE_PAGES_H_
#define KINDRED_CLI_HUGE_PAGES_H_

namespace kindred::cli {

// For the commands that read whole corpora (sweep, build, add, tune, plan,
// compact): starts the program again (execv of /proc/self/exe with the same argv) with
// glibc's malloc asking for transparent huge pages, unless GLIBC_TUNABLES
// already names that tunable, KINDRED_NO_HUGE_PAGES is set, or the program
// is built with a sanitizer. Either way,
// those commands keep up to 64 MiB freed at the top of each malloc heap
// instead of returning it to the kernel. Returns when it
// did not start again. Call first in main, before any thread or file.
void StartWithHugePages(int argc, char** argv);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_HUGE_PAGES_H_
