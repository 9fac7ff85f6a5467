// Counters and latency histograms of the service, rendered in the
// Prometheus text exposition format (version 0.0.4).
//
// Requests are counted by route (a fixed list, so the label set stays
// bounded) and status code; latencies go into one histogram per route with
// fixed bucket bounds.
//
// Thread-safety: Record and Render may be called concurrently.
#ifndef KINDRED_SERVICE_METRICS_H_
#define KINDRED_SERVICE_METRICS_H_

#include <array>
#include <atomic>
#include <cstdint>
#include <map>
#include <mutex>
#include <string>
#include <string_view>

#include "service/index_service.h"

namespace kindred::service {

class ServiceMetrics {
 public:
  // The routes counted; anything else counts as "other".
  static constexpr std::array<std::string_view, 7> kRoutes = {
      "/", "/v1/check", "/v1/add", "/v1/info", "/v1/health", "/metrics", "other"};
  static constexpr std::array<double, 14> kBounds = {0.0005, 0.001, 0.002, 0.005, 0.01, 0.025, 0.05,
                                                     0.1,    0.25,  0.5,   1,     2.5,  5,     10};

  // One answered request.
  void Record(std::string_view path, int status, double seconds);
  void CountRejected() { rejected_++; }
  void CountCutOff() { cut_off_++; }
  // The exposition text, with the service's own counts.
  std::string Render(const ServiceCounts& counts) const;

 private:
  static size_t RouteOf(std::string_view path);
  struct Histogram {
    std::array<std::atomic<uint64_t>, kBounds.size() + 1> buckets{};  // last: +Inf
    std::atomic<uint64_t> count{0};
    std::atomic<uint64_t> sum_micros{0};
  };
  std::array<Histogram, kRoutes.size()> latency_;
  mutable std::mutex mu_;
  std::map<std::pair<size_t, int>, uint64_t> requests_;  // (route, status) -> count
  std::atomic<uint64_t> rejected_{0};
  std::atomic<uint64_t> cut_off_{0};
};

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_METRICS_H_
