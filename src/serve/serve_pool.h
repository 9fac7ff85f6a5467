// The connection handling of `kindred serve` around cpp-httplib: a bounded
// pool of worker threads, and a watchdog that cuts off slow connections.
//
// WorkerPool (an httplib::TaskQueue; each task serves one connection):
// `workers` threads and at most `queued` connections waiting for one. When
// both are taken, a connection goes to one of two answering threads, whose
// requests are answered 503 with Retry-After (Rejecting() is true there;
// the HTTP layer checks it before routing); when those are taken too, the
// accepting thread waits, and new connections wait in the kernel's backlog.
// Nothing queues without bound.
//
// ConnectionWatchdog: cpp-httplib's timeouts bound each read, not a whole
// request, so a client that sends one byte a second would hold a worker for
// hours. Every half second the watchdog lists the process's connected
// sockets (/proc/self/fd) and shuts down any that has gone longer than the
// request timeout, or has received more than `max_bytes`, without completing
// a request (RequestDone, keyed by the peer's address), which ends the
// worker's read at once. (cpp-httplib bounds each header line, not their
// number; the byte bound keeps a flood of headers from taking memory.)
//
// Thread-safety: all methods may be called concurrently.
#ifndef KINDRED_SERVE_SERVE_POOL_H_
#define KINDRED_SERVE_SERVE_POOL_H_

#include <httplib.h>

#include <atomic>
#include <chrono>
#include <condition_variable>
#include <cstdint>
#include <deque>
#include <functional>
#include <map>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

namespace kindred::serve {

class WorkerPool : public httplib::TaskQueue {
 public:
  WorkerPool(int workers, size_t queued, std::function<void()> on_reject);
  ~WorkerPool() override;
  void enqueue(std::function<void()> fn) override;
  // Finishes the queued connections, then joins the threads.
  void shutdown() override;
  // True on a thread that answers 503 to everything.
  static bool Rejecting();

 private:
  void Work(bool rejecting);

  const size_t workers_;
  const size_t queued_;
  std::function<void()> on_reject_;
  std::mutex mu_;
  std::condition_variable work_;
  std::condition_variable room_;
  std::deque<std::function<void()>> queue_;
  std::deque<std::function<void()>> reject_queue_;
  size_t busy_ = 0;
  bool stopping_ = false;
  std::vector<std::thread> threads_;
};

class ConnectionWatchdog {
 public:
  // Calls on_cut(peer, seconds) for each connection cut off.
  ConnectionWatchdog(std::chrono::seconds timeout, uint64_t max_bytes,
                     std::function<void(const std::string& peer, double seconds)> on_cut);
  ~ConnectionWatchdog();
  // A request from `peer` ("address:port") was answered.
  void RequestDone(const std::string& peer);

 private:
  void Loop();
  void Scan();

  const std::chrono::seconds timeout_;
  const uint64_t max_bytes_;
  std::function<void(const std::string&, double)> on_cut_;
  std::mutex mu_;
  std::condition_variable wake_;
  bool stopping_ = false;
  // Per socket inode: since when, and from which count of bytes received,
  // it has been without a completed request.
  struct Window {
    std::chrono::steady_clock::time_point since;
    uint64_t bytes = 0;
  };
  std::map<uint64_t, Window> since_;
  std::map<std::string, std::chrono::steady_clock::time_point> done_;  // peer -> last answer
  std::thread thread_;
};

}  // namespace kindred::serve

#endif  // KINDRED_SERVE_SERVE_POOL_H_
