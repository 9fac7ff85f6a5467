// The HTTP layer of `kindred serve`: routes, authentication, limits, error
// replies and the request log, over cpp-httplib. The work itself is the
// service core's (src/service/index_service.h).
//
// Routes: POST /v1/check, POST /v1/add, GET /v1/info, GET /v1/health,
// GET /metrics, GET / (the page). Errors are JSON {"error": "...",
// "kind": "..."} with the status codes listed in README.md ("kindred
// serve"). Every request is logged on stderr in one line: method, path,
// status, documents, milliseconds.
//
// Thread-safety: Run() blocks on the calling thread; Stop() may be called
// from any thread (it makes Run() return after the in-flight requests).
#ifndef KINDRED_SERVE_SERVE_HTTP_H_
#define KINDRED_SERVE_SERVE_HTTP_H_

#include <chrono>
#include <cstdint>
#include <memory>
#include <string>

#include "absl/status/statusor.h"
#include "service/index_service.h"
#include "service/metrics.h"
#include "service/service_request.h"

namespace kindred::serve {

struct HttpOptions {
  std::string host = "127.0.0.1";
  int port = 8750;  // 0: any free port
  // The bearer token; empty: none (then adds are refused).
  std::string token;
  int workers = 32;
  size_t queued = 64;                         // connections waiting for a worker
  uint64_t max_request_bytes = 64ull << 20;  // request body
  std::chrono::seconds io_timeout{5};         // each read or write
  std::chrono::seconds request_timeout{30};   // a whole request
  bool log_requests = true;
  service::RequestLimits limits;
};

class HttpServer {
 public:
  HttpServer(service::IndexService* service, HttpOptions options);
  ~HttpServer();
  // Binds the address; returns the port (the chosen one for port 0).
  // Errors: Unavailable (cannot bind).
  absl::StatusOr<int> Bind();
  // Serves until Stop(). Requires Bind().
  void Run();
  void Stop();

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// The page served at GET / (self-contained HTML).
const char* ServicePage();

}  // namespace kindred::serve

#endif  // KINDRED_SERVE_SERVE_HTTP_H_
