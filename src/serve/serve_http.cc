#include "serve/serve_http.h"

#include <cstdio>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "serve/serve_pool.h"
#include "serve/socket_info.h"
#include "core/plural.h"
#include "kindred/errors.h"
#include "service/index_info.h"
#include "service/service_errors.h"
#include "service/service_replies.h"

namespace kindred::serve {
namespace {

using Clock = std::chrono::steady_clock;
thread_local Clock::time_point t_start;
thread_local uint64_t t_documents = 0;

struct Route {
  const char* path;
  const char* method;
};
constexpr Route kRoutes[] = {{"/", "GET"},        {"/v1/health", "GET"}, {"/v1/info", "GET"},
                             {"/metrics", "GET"}, {"/v1/check", "POST"}, {"/v1/add", "POST"}};

void SetError(httplib::Response& res, int status, std::string_view kind, std::string_view message) {
  res.status = status;
  res.set_content(service::ErrorReply(message, kind), "application/json");
}

// The HTTP status and "kind" of an error of the service core: a refusal of
// the service (service_errors.h), else by the library's error kind
// (kindred/errors.h). The one place where errors become HTTP statuses.
struct HttpError {
  int status;
  std::string_view kind;
};

HttpError HttpErrorFor(const absl::Status& status) {
  if (const auto refusal = service::RefusalOf(status); refusal.has_value()) {
    switch (*refusal) {
      case service::Refusal::kDuplicateId:
        return {409, "duplicate_id"};
      case service::Refusal::kReadOnly:
        return {405, "read_only"};
      case service::Refusal::kUnavailable:
        return {503, "unavailable"};
    }
  }
  switch (KindOf(status)) {
    case ErrorKind::kInvalidRequest:
    case ErrorKind::kBadInput:
      return {400, "bad_request"};
    case ErrorKind::kLimitExceeded:
      return {413, "too_large"};
    case ErrorKind::kIndexBusy:
      return {503, "unavailable"};
    case ErrorKind::kDiskFull:
    case ErrorKind::kWriteFailed:
      return {500, "write_failed"};
    case ErrorKind::kIndexDamaged:
      return {500, "index_damaged"};
    case ErrorKind::kSettingsMismatch:
      return {500, "settings_mismatch"};
    case ErrorKind::kInputChanged:
    case ErrorKind::kInternal:
      break;
  }
  return {500, "internal"};
}

void SetStatusError(httplib::Response& res, const absl::Status& status) {
  const HttpError error = HttpErrorFor(status);
  if (error.status == 503) res.set_header("Retry-After", "1");
  SetError(res, error.status, error.kind, std::string(status.message()));
}

// Compares in time that depends on the lengths only, not on where the
// bytes differ.
bool SameToken(std::string_view given, std::string_view wanted) {
  unsigned char diff = given.size() == wanted.size() ? 0 : 1;
  for (size_t i = 0; i < given.size(); ++i) {
    diff |= static_cast<unsigned char>(given[i] ^ wanted[i % std::max<size_t>(1, wanted.size())]);
  }
  return diff == 0 && !wanted.empty();
}

// A path as logged: control bytes replaced, at most 200 bytes.
std::string LoggedPath(const std::string& path) {
  std::string out = path.substr(0, 200);
  for (char& c : out) {
    if (static_cast<unsigned char>(c) < 0x20 || c == 0x7f) c = '?';
  }
  return out;
}

}  // namespace

struct HttpServer::Impl {
  service::IndexService* service;
  HttpOptions options;
  service::ServiceMetrics metrics;
  httplib::Server server;
  std::unique_ptr<ConnectionWatchdog> watchdog;

  httplib::Server::HandlerResponse PreRoute(const httplib::Request& req, httplib::Response& res);
  bool Authorized(const httplib::Request& req) const;
  // Sets the error response when a POST body is too large or of the wrong
  // media type, and says whether it did.
  bool RejectedBody(const httplib::Request& req, httplib::Response& res) const;
  void Query(const httplib::Request& req, httplib::Response& res, bool add);
  void Log(const httplib::Request& req, const httplib::Response& res);
  void Install();
};

bool HttpServer::Impl::Authorized(const httplib::Request& req) const {
  const std::string header = req.get_header_value("Authorization");
  constexpr std::string_view kBearer = "Bearer ";
  if (header.size() < kBearer.size() || header.compare(0, kBearer.size(), kBearer) != 0) {
    return false;
  }
  return SameToken(std::string_view(header).substr(kBearer.size()), options.token);
}

bool HttpServer::Impl::RejectedBody(const httplib::Request& req, httplib::Response& res) const {
  uint64_t length = 0;
  if (!absl::SimpleAtoi(req.get_header_value("Content-Length"), &length)) length = 0;
  if (length > options.max_request_bytes) {
    res.set_header("Connection", "close");
    SetError(res, 413, "too_large",
             absl::StrCat("a request body of ", length, " bytes: the limit is ",
                          options.max_request_bytes));
    return true;
  }
  const std::string type = req.get_header_value("Content-Type");
  const std::string media = type.substr(0, type.find(';'));
  if (media != "application/json" && media != "text/plain") {
    SetError(res, 415, "unsupported_media_type",
             "send application/json or text/plain (one document)");
    return true;
  }
  return false;
}

httplib::Server::HandlerResponse HttpServer::Impl::PreRoute(const httplib::Request& req,
                                                            httplib::Response& res) {
  using HR = httplib::Server::HandlerResponse;
  t_start = Clock::now();
  t_documents = 0;
  if (WorkerPool::Rejecting()) {
    res.set_header("Retry-After", "1");
    res.set_header("Connection", "close");
    SetError(res, 503, "busy", "every worker is busy: try again shortly");
    return HR::Handled;
  }
  const Route* route = nullptr;
  bool path_known = false;
  for (const Route& r : kRoutes) {
    if (req.path != r.path) continue;
    path_known = true;
    if (req.method == r.method) route = &r;
  }
  if (!path_known) {
    SetError(res, 404, "not_found", absl::StrCat("no such resource: ", LoggedPath(req.path)));
    return HR::Handled;
  }
  if (route == nullptr) {
    for (const Route& r : kRoutes) {
      if (req.path == r.path) res.set_header("Allow", r.method);
    }
    SetError(res, 405, "method_not_allowed", absl::StrCat(req.method, " is not allowed here"));
    return HR::Handled;
  }
  const std::string path = req.path;
  if (path == "/v1/add" && !service->allows_add()) {
    SetError(res, 405, "read_only",
             "this service is read-only: start it with --allow-add to accept adds");
    return HR::Handled;
  }
  const bool guarded =
      path == "/v1/add" || (!options.token.empty() && path != "/" && path != "/v1/health");
  if (guarded && !Authorized(req)) {
    res.set_header("WWW-Authenticate", "Bearer");
    SetError(res, 401, "unauthorized", "a valid \"Authorization: Bearer\" token is required");
    return HR::Handled;
  }
  if (std::string_view(route->method) == "POST" && RejectedBody(req, res)) return HR::Handled;
  return HR::Unhandled;
}

void HttpServer::Impl::Query(const httplib::Request& req, httplib::Response& res, bool add) {
  const std::string type = req.get_header_value("Content-Type");
  auto request =
      type.rfind("text/plain", 0) == 0
          ? service::TextRequest(
                req.body, req.has_param("id") ? req.get_param_value("id") : std::string("upload"),
                options.limits)
          : service::ParseJsonRequest(req.body, options.limits);
  if (!request.ok()) return SetStatusError(res, request.status());
  t_documents = request->documents.size();
  auto reply = add ? service->Add(*request) : service->Check(*request);
  if (!reply.ok()) return SetStatusError(res, reply.status());
  res.set_content(*reply, "application/json");
}

void HttpServer::Impl::Log(const httplib::Request& req, const httplib::Response& res) {
  const double seconds = t_start == Clock::time_point{}
                             ? 0
                             : std::chrono::duration<double>(Clock::now() - t_start).count();
  metrics.Record(req.path, res.status, seconds);
  if (watchdog) watchdog->RequestDone(absl::StrCat(req.remote_addr, ":", req.remote_port));
  if (options.log_requests) {
    std::fprintf(stderr, "kindred serve: %s %s %d %s %.3f ms\n", LoggedPath(req.method).c_str(),
                 LoggedPath(req.path).c_str(), res.status,
                 Counted(t_documents, "document").c_str(), seconds * 1e3);
  }
  t_start = Clock::time_point{};
  t_documents = 0;
}

void HttpServer::Impl::Install() {
  server.new_task_queue = [this] {
    return new WorkerPool(options.workers, options.queued, [this] { metrics.CountRejected(); });
  };
  server.set_read_timeout(options.io_timeout);
  server.set_write_timeout(options.io_timeout);
  server.set_keep_alive_timeout(2);
  server.set_keep_alive_max_count(1000);
  server.set_payload_max_length(options.max_request_bytes);
  server.set_tcp_nodelay(true);
  server.set_pre_routing_handler(
      [this](const httplib::Request& req, httplib::Response& res) { return PreRoute(req, res); });
  server.set_logger(
      [this](const httplib::Request& req, const httplib::Response& res) { Log(req, res); });
  server.set_error_handler([](const httplib::Request&, httplib::Response& res) {
    if (!res.body.empty()) return;
    SetError(res, res.status, res.status == 413 ? "too_large" : "bad_request",
             absl::StrCat("the request was refused (HTTP ", res.status, ")"));
  });
  server.set_exception_handler(
      [](const httplib::Request&, httplib::Response& res, std::exception_ptr) {
        SetError(res, 500, "internal", "an internal error: please report it");
      });
  server.Post("/v1/check", [this](const httplib::Request& req, httplib::Response& res) {
    Query(req, res, false);
  });
  server.Post("/v1/add", [this](const httplib::Request& req, httplib::Response& res) {
    Query(req, res, true);
  });
  server.Get("/v1/info", [this](const httplib::Request&, httplib::Response& res) {
    std::string body;
    service->WithReader([&body](const IndexReader& reader) { body = service::IndexInfoJson(reader); });
    res.set_content(body, "application/json");
  });
  server.Get("/v1/health", [this](const httplib::Request&, httplib::Response& res) {
    const service::ServiceCounts counts = service->counts();
    res.set_content(service::HealthReply(counts.live_documents, service->allows_add()),
                    "application/json");
  });
  server.Get("/metrics", [this](const httplib::Request&, httplib::Response& res) {
    res.set_content(metrics.Render(service->counts()), "text/plain; version=0.0.4");
  });
  server.Get("/", [](const httplib::Request&, httplib::Response& res) {
    res.set_header("Content-Security-Policy",
                   "default-src 'none'; script-src 'unsafe-inline'; style-src 'unsafe-inline'; "
                   "connect-src 'self'; form-action 'none'; base-uri 'none'");
    res.set_content(ServicePage(), "text/html; charset=utf-8");
  });
}

HttpServer::HttpServer(service::IndexService* service, HttpOptions options)
    : impl_(new Impl{service, std::move(options), {}, {}, nullptr}) {
  impl_->Install();
}

HttpServer::~HttpServer() = default;

absl::StatusOr<int> HttpServer::Bind() {
  int port = impl_->options.port;
  if (port == 0) {
    port = impl_->server.bind_to_any_port(impl_->options.host);
  } else if (!impl_->server.bind_to_port(impl_->options.host, port)) {
    port = -1;
  }
  if (port < 0) {
    return absl::UnavailableError(
        absl::StrCat("cannot listen on ", impl_->options.host, ":", impl_->options.port));
  }
  WidenListenBacklogs(SOMAXCONN);
  return port;
}

void HttpServer::Run() {
  impl_->watchdog = std::make_unique<ConnectionWatchdog>(
      impl_->options.request_timeout, impl_->options.max_request_bytes + (1 << 20),
      [this](const std::string& peer, double seconds) {
        impl_->metrics.CountCutOff();
        std::fprintf(stderr,
                     "kindred serve: cut off %s after %.1f s without a complete request (too slow "
                     "or too large)\n",
                     peer.c_str(), seconds);
      });
  impl_->server.listen_after_bind();
  impl_->watchdog.reset();
}

void HttpServer::Stop() { impl_->server.stop(); }

}  // namespace kindred::serve
