#include "cli/socket_bytes.h"

#include <linux/tcp.h>
#include <netinet/in.h>
#include <sys/socket.h>

#include <cstddef>

namespace kindred::cli {

uint64_t BytesReceived(int fd) {
  tcp_info info{};
  socklen_t len = sizeof(info);
  if (getsockopt(fd, IPPROTO_TCP, TCP_INFO, &info, &len) != 0) return 0;
  if (len < offsetof(tcp_info, tcpi_bytes_received) + sizeof(info.tcpi_bytes_received)) return 0;
  return info.tcpi_bytes_received;
}

}  // namespace kindred::cli
