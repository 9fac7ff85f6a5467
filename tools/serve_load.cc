// A load client for the benchmark of `kindred serve` (tools/serve_bench.py):
// CLIENTS threads, each with one keep-alive connection, send POST requests
// for SECONDS (or until REQUESTS in all), and the program prints the count,
// errors, rate and latency percentiles as one JSON object, with the
// percentiles of the service's own time per request (the "seconds" field of
// its replies), which leave out the HTTP layer and the waits around it.
//
// Usage: kindred_serve_load PORT TOKEN PATH CLIENTS SECONDS REQUESTS BODIES
// BODIES is a file of request bodies, one per line; "@ID@" in a body is
// replaced by an id unique to the request (for adds). Requests cycle
// through the bodies, each client starting at its own offset.
#include <httplib.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <string>
#include <thread>
#include <vector>

int main(int argc, char** argv) {
  if (argc != 8) {
    std::fprintf(stderr, "usage: %s PORT TOKEN PATH CLIENTS SECONDS REQUESTS BODIES\n", argv[0]);
    return 2;
  }
  const int port = std::stoi(argv[1]);
  const std::string token = argv[2];
  const std::string path = argv[3];
  const int clients = std::stoi(argv[4]);
  const double seconds = std::stod(argv[5]);
  const long limit = std::stol(argv[6]);
  std::vector<std::string> bodies;
  std::ifstream in(argv[7]);
  for (std::string line; std::getline(in, line);) {
    if (!line.empty()) bodies.push_back(line);
  }
  if (bodies.empty()) return 2;
  std::atomic<long> issued{0};
  std::atomic<long> errors{0};
  std::vector<std::vector<double>> latencies(clients);
  std::vector<std::vector<double>> service(clients);
  const auto start = std::chrono::steady_clock::now();
  const auto deadline = start + std::chrono::duration<double>(seconds);
  std::vector<std::thread> threads;
  for (int c = 0; c < clients; ++c) {
    threads.emplace_back([&, c] {
      httplib::Client client("127.0.0.1", port);
      client.set_keep_alive(true);
      client.set_tcp_nodelay(true);
      client.set_read_timeout(60);
      httplib::Headers headers;
      if (token != "-") headers.emplace("Authorization", "Bearer " + token);
      const std::string tag =
          std::to_string(std::chrono::system_clock::now().time_since_epoch().count());
      for (size_t n = c * 7919; std::chrono::steady_clock::now() < deadline; ++n) {
        const long number = issued.fetch_add(1);
        if (limit > 0 && number >= limit) break;
        std::string body = bodies[n % bodies.size()];
        if (size_t at = body.find("@ID@"); at != std::string::npos) {
          body.replace(at, 4, "load-" + tag + "-" + std::to_string(c) + "-" + std::to_string(n));
        }
        const auto t0 = std::chrono::steady_clock::now();
        auto result = client.Post(path.c_str(), headers, body, "application/json");
        const auto t1 = std::chrono::steady_clock::now();
        if (!result || result->status != 200) {
          if (errors++ < 5) {
            std::fprintf(stderr, "kindred_serve_load: %s\n",
                         result ? ("HTTP " + std::to_string(result->status)).c_str()
                                : httplib::to_string(result.error()).c_str());
          }
          continue;
        }
        latencies[c].push_back(std::chrono::duration<double>(t1 - t0).count());
        // The service's own time for the request (its "seconds" field).
        if (size_t at = result->body.rfind("\"seconds\":"); at != std::string::npos) {
          service[c].push_back(std::strtod(result->body.c_str() + at + 10, nullptr));
        }
      }
    });
  }
  for (auto& t : threads) t.join();
  const double wall =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  auto sorted = [](const std::vector<std::vector<double>>& parts) {
    std::vector<double> all;
    for (auto& l : parts) all.insert(all.end(), l.begin(), l.end());
    std::sort(all.begin(), all.end());
    return all;
  };
  const std::vector<double> all = sorted(latencies);
  const std::vector<double> inside = sorted(service);
  auto rank = [](const std::vector<double>& values, double q) {
    if (values.empty()) return 0.0;
    size_t k = static_cast<size_t>(q * values.size());
    return values[std::min(values.size() - 1, k == 0 ? 0 : k - 1)] * 1e3;
  };
  std::printf(
      "{\"requests\":%zu,\"errors\":%ld,\"seconds\":%.3f,\"per_second\":%.1f,"
      "\"median_ms\":%.3f,\"p99_ms\":%.3f,\"max_ms\":%.3f,"
      "\"service_median_ms\":%.3f,\"service_p99_ms\":%.3f}\n",
      all.size(), errors.load(), wall, all.size() / wall, rank(all, 0.5), rank(all, 0.99),
      all.empty() ? 0.0 : all.back() * 1e3, rank(inside, 0.5), rank(inside, 0.99));
  return errors.load() == 0 ? 0 : 1;
}
