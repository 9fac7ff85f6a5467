#include "serve/socket_info.h"

#include <dirent.h>

#include <linux/tcp.h>
#include <netinet/in.h>
#include <sys/socket.h>

#include <cstddef>
#include <cstdlib>

namespace kindred::serve {

uint64_t BytesReceived(int fd) {
  tcp_info info{};
  socklen_t len = sizeof(info);
  if (getsockopt(fd, IPPROTO_TCP, TCP_INFO, &info, &len) != 0) return 0;
  if (len < offsetof(tcp_info, tcpi_bytes_received) + sizeof(info.tcpi_bytes_received)) return 0;
  return info.tcpi_bytes_received;
}

void WidenListenBacklogs(int backlog) {
  DIR* dir = opendir("/proc/self/fd");
  if (dir == nullptr) return;
  while (dirent* entry = readdir(dir)) {
    if (entry->d_name[0] == '.') continue;
    const int fd = std::atoi(entry->d_name);
    int listening = 0;
    socklen_t len = sizeof(listening);
    if (getsockopt(fd, SOL_SOCKET, SO_ACCEPTCONN, &listening, &len) == 0 && listening) {
      listen(fd, backlog);
    }
  }
  closedir(dir);
}

}  // namespace kindred::serve
