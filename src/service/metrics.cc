#include "service/metrics.h"

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"

namespace kindred::service {

size_t ServiceMetrics::RouteOf(std::string_view path) {
  for (size_t i = 0; i + 1 < kRoutes.size(); ++i) {
    if (kRoutes[i] == path) return i;
  }
  return kRoutes.size() - 1;
}

void ServiceMetrics::Record(std::string_view path, int status, double seconds) {
  const size_t route = RouteOf(path);
  Histogram& h = latency_[route];
  size_t bucket = 0;
  while (bucket < kBounds.size() && seconds > kBounds[bucket]) ++bucket;
  h.buckets[bucket]++;
  h.count++;
  h.sum_micros += static_cast<uint64_t>(seconds * 1e6);
  std::lock_guard<std::mutex> lock(mu_);
  requests_[{route, status}]++;
}

namespace {

void Counter(std::string* out, std::string_view name, std::string_view help, uint64_t value,
             std::string_view type = "counter") {
  absl::StrAppend(out, "# HELP ", absl::string_view(name.data(), name.size()), " ",
                  absl::string_view(help.data(), help.size()), "\n# TYPE ",
                  absl::string_view(name.data(), name.size()), " ",
                  absl::string_view(type.data(), type.size()), "\n",
                  absl::string_view(name.data(), name.size()), " ", value, "\n");
}

}  // namespace

std::string ServiceMetrics::Render(const ServiceCounts& counts) const {
  std::string out;
  out += "# HELP kindred_requests_total HTTP requests answered, by route and status code.\n";
  out += "# TYPE kindred_requests_total counter\n";
  {
    std::lock_guard<std::mutex> lock(mu_);
    for (const auto& [key, value] : requests_) {
      absl::StrAppendFormat(&out, "kindred_requests_total{route=\"%s\",code=\"%d\"} %u\n",
                            kRoutes[key.first], key.second, value);
    }
  }
  out += "# HELP kindred_request_seconds Time from the request's headers to its answer.\n";
  out += "# TYPE kindred_request_seconds histogram\n";
  for (size_t r = 0; r < kRoutes.size(); ++r) {
    const Histogram& h = latency_[r];
    uint64_t cumulative = 0;
    for (size_t b = 0; b <= kBounds.size(); ++b) {
      cumulative += h.buckets[b].load();
      const std::string bound = b < kBounds.size() ? absl::StrFormat("%g", kBounds[b]) : "+Inf";
      absl::StrAppendFormat(&out, "kindred_request_seconds_bucket{route=\"%s\",le=\"%s\"} %u\n",
                            kRoutes[r], bound, cumulative);
    }
    absl::StrAppendFormat(&out, "kindred_request_seconds_sum{route=\"%s\"} %.6f\n", kRoutes[r],
                          static_cast<double>(h.sum_micros.load()) / 1e6);
    absl::StrAppendFormat(&out, "kindred_request_seconds_count{route=\"%s\"} %u\n", kRoutes[r],
                          h.count.load());
  }
  Counter(&out, "kindred_documents_checked_total", "Documents checked.", counts.documents_checked);
  Counter(&out, "kindred_documents_added_total", "Documents added or replaced.",
          counts.documents_added);
  Counter(&out, "kindred_matches_total", "Matches reported by checks and adds.", counts.matches);
  Counter(&out, "kindred_segments_written_total", "Segments written by group commit.",
          counts.segments);
  Counter(&out, "kindred_add_requests_committed_total", "Add requests committed.",
          counts.add_requests_committed);
  Counter(&out, "kindred_busy_rejections_total",
          "Requests answered 503 because all workers were busy.", rejected_.load());
  Counter(&out, "kindred_connections_cut_total",
          "Connections cut off for taking longer than the request timeout.", cut_off_.load());
  Counter(&out, "kindred_live_documents", "Live documents in the index.", counts.live_documents,
          "gauge");
  return out;
}

}  // namespace kindred::service
