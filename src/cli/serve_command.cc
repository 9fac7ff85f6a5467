// kindred serve: hold an index open and answer checks (and, with
// --allow-add, adds) over HTTP; serve a page for editors. The service core
// is src/service/, the HTTP layer the module of src/serve/ (serve_module.h):
// this file checks the command line, loads the module and hands it over.
#include <dlfcn.h>
#include <unistd.h>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "cli/cli.h"
#include "cli/output.h"
#include "kindred/file_io.h"
#include "serve/serve_module.h"

namespace kindred::cli {
namespace {

using serve::HttpOptions;

constexpr char kServeModuleName[] = "kindred_serve.so";

struct ServeFlags {
  std::string index;
  std::string listen = "127.0.0.1:8750";
  std::string token_file;
  bool allow_add = false;
  int workers = 32;
  size_t queue = 64;
  std::string max_document_size = "64M";
  std::string max_request_size = "64M";
  uint64_t max_documents = 10000;
  int io_timeout = 5;
  int request_timeout = 30;
  bool quiet = false;
};

// Splits "ADDR:PORT" ("[v6]:PORT" for IPv6).
absl::Status ParseListen(const std::string& listen, std::string* host, int* port) {
  const size_t colon = listen.rfind(':');
  if (colon == std::string::npos || colon == 0 ||
      !absl::SimpleAtoi(listen.substr(colon + 1), port) || *port < 0 || *port > 65535) {
    return absl::InvalidArgumentError(absl::StrCat(
        "--listen: expected ADDRESS:PORT (port 0 picks a free one), not \"", listen, "\""));
  }
  *host = listen.substr(0, colon);
  if (host->size() > 2 && host->front() == '[' && host->back() == ']') {
    *host = host->substr(1, host->size() - 2);
  }
  return absl::OkStatus();
}

bool IsLoopback(const std::string& host) {
  return host == "localhost" || host == "::1" || host.rfind("127.", 0) == 0;
}

absl::StatusOr<std::string> ReadToken(const std::string& path) {
  auto file = DefaultFileSystem()->OpenRead(path);
  absl::StatusOr<std::string> read =
      file.ok() ? ReadToEnd(**file) : absl::StatusOr<std::string>(file.status());
  if (!read.ok()) return absl::NotFoundError(absl::StrCat("cannot read the token file ", path));
  std::string token = *std::move(read);
  while (!token.empty() && (token.back() == '\n' || token.back() == '\r' || token.back() == ' ')) {
    token.pop_back();
  }
  if (token.size() < 16 || token.find_first_of(" \t\r\n") != std::string::npos) {
    return absl::InvalidArgumentError(absl::StrCat(
        "the token file ", path, " must hold one token of at least 16 characters, no spaces"));
  }
  return token;
}

absl::StatusOr<HttpOptions> ToHttpOptions(const ServeFlags& flags) {
  HttpOptions options;
  if (absl::Status s = ParseListen(flags.listen, &options.host, &options.port); !s.ok()) return s;
  if (!flags.token_file.empty()) {
    auto token = ReadToken(flags.token_file);
    if (!token.ok()) return token.status();
    options.token = *token;
  }
  if (!IsLoopback(options.host) && options.token.empty()) {
    return absl::InvalidArgumentError(absl::StrCat(
        "listening on ", options.host, ", which is not a loopback address, needs --token-file"));
  }
  if (flags.allow_add && options.token.empty()) {
    return absl::InvalidArgumentError(
        "--allow-add needs --token-file: every add must carry the token");
  }
  auto document = ParseByteSize(flags.max_document_size);
  if (!document.ok()) return document.status();
  auto request = ParseByteSize(flags.max_request_size);
  if (!request.ok()) return request.status();
  if (flags.workers < 1 || flags.io_timeout < 1 || flags.request_timeout < 1 ||
      flags.max_documents < 1) {
    return absl::InvalidArgumentError(
        "--workers, --max-documents and the timeouts must be at least 1");
  }
  options.workers = flags.workers;
  options.queued = flags.queue;
  options.max_request_bytes = *request;
  options.io_timeout = std::chrono::seconds(flags.io_timeout);
  options.request_timeout = std::chrono::seconds(flags.request_timeout);
  options.log_requests = !flags.quiet;
  options.limits.max_document_bytes = *document;
  options.limits.max_documents = flags.max_documents;
  return options;
}

// The HTTP service module (serve_module.h): beside the program (the build
// tree), else where it is installed. Errors: Internal, naming both places.
absl::StatusOr<serve::ServeEntry> LoadServeModule() {
  std::string beside;
  char self[4096];
  const ssize_t length = readlink("/proc/self/exe", self, sizeof(self) - 1);
  if (length > 0) {
    beside.assign(self, length);
    beside.resize(beside.rfind('/') + 1);
  }
  beside += kServeModuleName;
  std::string tried;
  for (const std::string& path : {beside, std::string(KINDRED_SERVE_MODULE_INSTALLED)}) {
    void* module = dlopen(path.c_str(), RTLD_NOW | RTLD_LOCAL);
    if (module == nullptr) {
      absl::StrAppend(&tried, tried.empty() ? "" : "; ", dlerror());
      continue;
    }
    if (void* entry = dlsym(module, serve::kServeEntryName); entry != nullptr) {
      return reinterpret_cast<serve::ServeEntry>(entry);
    }
    absl::StrAppend(&tried, tried.empty() ? "" : "; ", path, " has no ", serve::kServeEntryName);
  }
  return absl::InternalError(
      absl::StrCat("cannot load the HTTP service module ", kServeModuleName, ": ", tried));
}

int RunServe(const ServeFlags& flags) {
  auto options = ToHttpOptions(flags);
  if (!options.ok()) return Fail(kExitUsage, options.status());
  auto entry = LoadServeModule();
  if (!entry.ok()) return Fail(entry.status());
  serve::ServeLaunch launch;
  launch.index = flags.index;
  launch.allow_add = flags.allow_add;
  launch.http = *std::move(options);
  serve::ServeOutcome outcome;
  (*entry)(&launch, &outcome);
  if (outcome.exit_code == kExitOk) return kExitOk;
  return Fail(outcome.exit_code, absl::UnknownError(outcome.message));
}

}  // namespace

void RegisterServe(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<ServeFlags>();
  CLI::App* command = app.add_subcommand(
      "serve",
      "Hold an index open and answer checks (and adds) over HTTP, with a page for editors");
  command->add_option("index", flags->index, "the index file")->required();
  command->add_option("--listen", flags->listen,
                      "ADDRESS:PORT to listen on; port 0 picks a free one (default "
                      "127.0.0.1:8750; an address other than loopback needs --token-file)");
  command->add_option("--token-file", flags->token_file,
                      "file holding the bearer token that requests must carry");
  command->add_flag("--allow-add", flags->allow_add,
                    "accept adds (takes the writer lock; needs --token-file)");
  command
      ->add_option("--workers", flags->workers,
                   "worker threads; each open connection holds one (default 32)")
      ->group("Limits");
  command
      ->add_option("--queue", flags->queue,
                   "connections waiting for a worker before 503 (default 64)")
      ->group("Limits");
  command
      ->add_option("--max-document-size", flags->max_document_size,
                   "largest document text (default 64M)")
      ->group("Limits");
  command
      ->add_option("--max-request-size", flags->max_request_size,
                   "largest request body (default 64M)")
      ->group("Limits");
  command
      ->add_option("--max-documents", flags->max_documents,
                   "documents per request at most (default 10000)")
      ->group("Limits");
  command
      ->add_option("--io-timeout", flags->io_timeout,
                   "seconds one read or write may wait (default 5)")
      ->group("Limits");
  command
      ->add_option("--request-timeout", flags->request_timeout,
                   "seconds a connection may take to complete a request (default 30)")
      ->group("Limits");
  command->add_flag("-q,--quiet", flags->quiet, "no request log on stderr");
  command->callback([flags, exit_code] { *exit_code = RunServe(*flags); });
}

}  // namespace kindred::cli
