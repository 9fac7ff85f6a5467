#include "serve/serve_pool.h"

#include <arpa/inet.h>
#include <dirent.h>
#include <netinet/in.h>
#include <sys/socket.h>
#include <unistd.h>

#include <cstddef>
#include <cstdlib>
#include <cstring>
#include <set>

#include "serve/socket_info.h"

namespace kindred::serve {
namespace {

thread_local bool t_rejecting = false;
constexpr size_t kRejectThreads = 2;
constexpr size_t kRejectQueue = 64;

}  // namespace

WorkerPool::WorkerPool(int workers, size_t queued, std::function<void()> on_reject)
    : workers_(static_cast<size_t>(std::max(1, workers))),
      queued_(queued),
      on_reject_(std::move(on_reject)) {
  for (size_t i = 0; i < workers_; ++i) threads_.emplace_back([this] { Work(false); });
  for (size_t i = 0; i < kRejectThreads; ++i) threads_.emplace_back([this] { Work(true); });
}

WorkerPool::~WorkerPool() { shutdown(); }

bool WorkerPool::Rejecting() { return t_rejecting; }

void WorkerPool::enqueue(std::function<void()> fn) {
  std::unique_lock<std::mutex> lock(mu_);
  room_.wait(lock, [this] {
    return stopping_ || busy_ + queue_.size() < workers_ + queued_ ||
           reject_queue_.size() < kRejectQueue;
  });
  if (busy_ + queue_.size() < workers_ + queued_) {
    queue_.push_back(std::move(fn));
  } else {
    reject_queue_.push_back(std::move(fn));
    if (on_reject_) on_reject_();
  }
  work_.notify_all();
}

void WorkerPool::shutdown() {
  {
    std::lock_guard<std::mutex> lock(mu_);
    if (stopping_ && threads_.empty()) return;
    stopping_ = true;
  }
  work_.notify_all();
  room_.notify_all();
  for (std::thread& thread : threads_) thread.join();
  threads_.clear();
}

void WorkerPool::Work(bool rejecting) {
  t_rejecting = rejecting;
  std::deque<std::function<void()>>& queue = rejecting ? reject_queue_ : queue_;
  while (true) {
    std::function<void()> fn;
    {
      std::unique_lock<std::mutex> lock(mu_);
      work_.wait(lock, [&] { return stopping_ || !queue.empty(); });
      if (queue.empty()) return;  // stopping, and nothing left to serve
      fn = std::move(queue.front());
      queue.pop_front();
      if (!rejecting) ++busy_;
    }
    fn();
    {
      std::lock_guard<std::mutex> lock(mu_);
      if (!rejecting) --busy_;
    }
    room_.notify_all();
  }
}

ConnectionWatchdog::ConnectionWatchdog(std::chrono::seconds timeout, uint64_t max_bytes,
                                       std::function<void(const std::string&, double)> on_cut)
    : timeout_(timeout),
      max_bytes_(max_bytes),
      on_cut_(std::move(on_cut)),
      thread_([this] { Loop(); }) {}

ConnectionWatchdog::~ConnectionWatchdog() {
  {
    std::lock_guard<std::mutex> lock(mu_);
    stopping_ = true;
  }
  wake_.notify_all();
  thread_.join();
}

void ConnectionWatchdog::RequestDone(const std::string& peer) {
  std::lock_guard<std::mutex> lock(mu_);
  done_[peer] = std::chrono::steady_clock::now();
}

void ConnectionWatchdog::Loop() {
  std::unique_lock<std::mutex> lock(mu_);
  while (!wake_.wait_for(lock, std::chrono::milliseconds(500), [this] { return stopping_; })) {
    lock.unlock();
    Scan();
    lock.lock();
  }
}

namespace {

// The socket inode of descriptor `fd`, or 0 when it is not a socket.
uint64_t SocketInode(int fd) {
  char link[64];
  const std::string path = "/proc/self/fd/" + std::to_string(fd);
  const ssize_t n = readlink(path.c_str(), link, sizeof(link) - 1);
  if (n <= 0) return 0;
  link[n] = '\0';
  if (std::strncmp(link, "socket:[", 8) != 0) return 0;
  return std::strtoull(link + 8, nullptr, 10);
}

// "address:port" of a connected socket's peer, or "" when it has none.
std::string PeerOf(int fd) {
  sockaddr_storage addr{};
  socklen_t len = sizeof(addr);
  if (getpeername(fd, reinterpret_cast<sockaddr*>(&addr), &len) != 0) return "";
  char host[INET6_ADDRSTRLEN] = {0};
  int port = 0;
  if (addr.ss_family == AF_INET) {
    auto* in = reinterpret_cast<sockaddr_in*>(&addr);
    inet_ntop(AF_INET, &in->sin_addr, host, sizeof(host));
    port = ntohs(in->sin_port);
  } else if (addr.ss_family == AF_INET6) {
    auto* in6 = reinterpret_cast<sockaddr_in6*>(&addr);
    inet_ntop(AF_INET6, &in6->sin6_addr, host, sizeof(host));
    port = ntohs(in6->sin6_port);
  } else {
    return "";
  }
  return std::string(host) + ":" + std::to_string(port);
}

}  // namespace

void ConnectionWatchdog::Scan() {
  const auto now = std::chrono::steady_clock::now();
  // The system calls first, without the lock: a scan preempted on a busy
  // machine must not hold up RequestDone, which every answer calls.
  struct Socket {
    int fd;
    uint64_t inode;
    std::string peer;
    uint64_t bytes;
  };
  std::vector<Socket> sockets;
  DIR* dir = opendir("/proc/self/fd");
  if (dir == nullptr) return;
  while (dirent* entry = readdir(dir)) {
    if (entry->d_name[0] == '.') continue;
    const int fd = std::atoi(entry->d_name);
    const uint64_t inode = SocketInode(fd);
    if (inode == 0) continue;
    int listening = 0;
    socklen_t len = sizeof(listening);
    if (getsockopt(fd, SOL_SOCKET, SO_ACCEPTCONN, &listening, &len) != 0 || listening) continue;
    std::string peer = PeerOf(fd);
    if (peer.empty()) continue;
    sockets.push_back(Socket{fd, inode, std::move(peer), BytesReceived(fd)});
  }
  closedir(dir);
  std::set<uint64_t> seen;
  std::set<std::string> peers;
  std::vector<std::pair<int, uint64_t>> overdue;
  std::vector<double> ages;
  std::vector<std::string> overdue_peers;
  {
    std::lock_guard<std::mutex> lock(mu_);
    for (const Socket& socket : sockets) {
      seen.insert(socket.inode);
      peers.insert(socket.peer);
      auto [it, fresh] = since_.emplace(socket.inode, Window{now, socket.bytes});
      Window& window = it->second;
      if (auto done = done_.find(socket.peer); done != done_.end() && done->second > window.since) {
        window = Window{done->second, socket.bytes};
      }
      const double age = std::chrono::duration<double>(now - window.since).count();
      if (now - window.since > timeout_ || socket.bytes - window.bytes > max_bytes_) {
        overdue.emplace_back(socket.fd, socket.inode);
        ages.push_back(age);
        overdue_peers.push_back(socket.peer);
        window = Window{now, socket.bytes};
      }
    }
    std::erase_if(since_, [&seen](const auto& entry) { return !seen.contains(entry.first); });
    std::erase_if(done_, [&peers](const auto& entry) { return !peers.contains(entry.first); });
  }
  for (size_t i = 0; i < overdue.size(); ++i) {
    // The descriptor may have been closed and reused meanwhile: same inode only.
    if (SocketInode(overdue[i].first) != overdue[i].second) continue;
    shutdown(overdue[i].first, SHUT_RDWR);
    if (on_cut_) on_cut_(overdue_peers[i], ages[i]);
  }
}

}  // namespace kindred::serve
