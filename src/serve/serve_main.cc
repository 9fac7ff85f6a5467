// The entry of the HTTP service module (serve_module.h): opens the index,
// binds, serves until SIGINT or SIGTERM, then stops cleanly.
#include <pthread.h>
#include <signal.h>

#include <atomic>
#include <chrono>
#include <cstdio>
#include <thread>

#include "cli/exit_codes.h"
#include "serve/serve_http.h"
#include "serve/serve_module.h"
#include "service/index_service.h"

namespace kindred::serve {
namespace {

void Failed(int exit_code, const absl::Status& status, ServeOutcome* outcome) {
  outcome->exit_code = exit_code;
  outcome->message = std::string(status.message());
}

void RunServe(const ServeLaunch& launch, ServeOutcome* outcome) {
  const HttpOptions& options = launch.http;
  // SIGINT and SIGTERM are taken by one thread (sigwait), so every other
  // thread, started after this, leaves them blocked.
  sigset_t stop_signals;
  sigemptyset(&stop_signals);
  sigaddset(&stop_signals, SIGINT);
  sigaddset(&stop_signals, SIGTERM);
  pthread_sigmask(SIG_BLOCK, &stop_signals, nullptr);
  signal(SIGPIPE, SIG_IGN);
  service::ServiceOptions service_options;
  service_options.path = launch.index;
  service_options.allow_add = launch.allow_add;
  auto service = service::IndexService::Open(service_options);
  if (!service.ok()) return Failed(cli::ExitCodeFor(service.status()), service.status(), outcome);
  HttpServer server(service->get(), options);
  auto port = server.Bind();
  if (!port.ok()) return Failed(cli::kExitUsage, port.status(), outcome);
  uint32_t live = 0;
  (*service)->WithReader([&live](const IndexReader& reader) { live = reader.live_count(); });
  std::fprintf(stderr, "kindred serve: listening on http://%s:%d/ (index %s, %u documents, %s)\n",
               options.host.find(':') == std::string::npos ? options.host.c_str()
                                                           : ("[" + options.host + "]").c_str(),
               *port, launch.index.c_str(), live,
               launch.allow_add ? "adds allowed with the token" : "read-only");
  std::atomic<bool> running{true};
  std::thread stopper([&server, &running, stop_signals] {
    int signal_number = 0;
    sigwait(&stop_signals, &signal_number);
    if (!running.load()) return;
    std::fprintf(stderr, "kindred serve: stopping (signal %d)\n", signal_number);
    while (running.load()) {  // until Run() returned (a stop before it started is lost)
      server.Stop();
      std::this_thread::sleep_for(std::chrono::milliseconds(50));
    }
  });
  server.Run();
  running = false;
  pthread_kill(stopper.native_handle(), SIGTERM);  // wakes sigwait when no signal came
  stopper.join();
  service->reset();  // answers queued adds, releases the writer lock
  std::fprintf(stderr, "kindred serve: stopped\n");
  outcome->exit_code = cli::kExitOk;
}

}  // namespace
}  // namespace kindred::serve

extern "C" __attribute__((visibility("default"))) void kindred_serve_main(
    const kindred::serve::ServeLaunch* launch, kindred::serve::ServeOutcome* outcome) {
  kindred::serve::RunServe(*launch, outcome);
}
