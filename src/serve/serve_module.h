// The boundary between the program and its HTTP service module.
//
// `kindred serve` is the one command that needs cpp-httplib, and loading it
// (with the TLS libraries under it) took about 20 ms of every start of the
// program, twice for the corpus commands that start themselves again with
// huge pages. So the service lives in a module, kindred_serve.so, that the
// program loads (dlopen) only when `serve` runs. The module holds its own
// copy of the library; only the plain data below crosses the boundary, so
// neither side's Abseil or library state is touched by the other.
//
// The program checks the command line (ServeLaunch is complete and valid
// when the entry is called); the module opens the index, serves until
// SIGINT or SIGTERM, and reports how it ended in ServeOutcome.
#ifndef KINDRED_SERVE_SERVE_MODULE_H_
#define KINDRED_SERVE_SERVE_MODULE_H_

#include <string>

#include "serve/serve_http.h"

namespace kindred::serve {

struct ServeLaunch {
  std::string index;  // the index file
  bool allow_add = false;
  HttpOptions http;
};

struct ServeOutcome {
  int exit_code = 0;    // the documented exit codes (src/cli/cli.h)
  std::string message;  // why it failed; empty on success
};

// The module's one exported function, looked up by this name.
inline constexpr char kServeEntryName[] = "kindred_serve_main";
using ServeEntry = void (*)(const ServeLaunch* launch, ServeOutcome* outcome);

}  // namespace kindred::serve

#endif  // KINDRED_SERVE_SERVE_MODULE_H_
