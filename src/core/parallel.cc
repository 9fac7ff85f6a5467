#include "core/parallel.h"

#include <algorithm>
#include <atomic>
#include <thread>
#include <vector>

namespace kindred {

int DefaultThreadCount() {
  const unsigned hardware = std::thread::hardware_concurrency();
  return hardware == 0 ? 1 : static_cast<int>(hardware);
}

void ParallelFor(size_t n, int threads,
                 const std::function<void(size_t begin, size_t end, int worker)>& body) {
  if (n == 0) return;
  threads = std::max(1, std::min<int>(threads, static_cast<int>(std::min<size_t>(n, 1024))));
  if (threads == 1) {
    body(0, n, 0);
    return;
  }
  const size_t chunk = std::max<size_t>(1, n / (static_cast<size_t>(threads) * 8));
  std::atomic<size_t> next{0};
  auto run = [&](int worker) {
    for (;;) {
      const size_t begin = next.fetch_add(chunk, std::memory_order_relaxed);
      if (begin >= n) return;
      body(begin, std::min(n, begin + chunk), worker);
    }
  };
  std::vector<std::thread> pool;
  pool.reserve(threads - 1);
  for (int worker = 1; worker < threads; ++worker) pool.emplace_back(run, worker);
  run(0);
  for (std::thread& thread : pool) thread.join();
}

}  // namespace kindred
